import { and, eq } from "drizzle-orm";
import { db } from "@/db";
import { alerts, bins, farms, memberships, probes, zones } from "@/db/schema";
import type { Role } from "@/db/schema";
import type { UnitSystem } from "@/lib/domain/vocabulary";

export type Target = { farmId: string } | { binId: string } | { zoneId: string } | { probeId: number } | { alertId: string };

const uuidRe = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

// The farm a target belongs to, or null when it does not exist (or the id is malformed).
export async function farmOfTarget(target: Target): Promise<string | null> {
  const d = db();
  if ("farmId" in target) return uuidRe.test(target.farmId) ? target.farmId : null;
  if ("binId" in target) {
    if (!uuidRe.test(target.binId)) return null;
    const [r] = await d.select({ farmId: bins.farmId }).from(bins).where(eq(bins.id, target.binId));
    return r?.farmId ?? null;
  }
  if ("zoneId" in target) {
    if (!uuidRe.test(target.zoneId)) return null;
    const [r] = await d.select({ farmId: bins.farmId }).from(zones).innerJoin(bins, eq(bins.id, zones.binId)).where(eq(zones.id, target.zoneId));
    return r?.farmId ?? null;
  }
  if ("probeId" in target) {
    if (!Number.isSafeInteger(target.probeId)) return null;
    const [r] = await d.select({ farmId: probes.farmId }).from(probes).where(eq(probes.id, target.probeId));
    return r?.farmId ?? null;
  }
  if (!uuidRe.test(target.alertId)) return null;
  const [r] = await d.select({ farmId: alerts.farmId }).from(alerts).where(eq(alerts.id, target.alertId));
  return r?.farmId ?? null;
}

/** A person's role on a farm, with the farm's unit system (what its refusals and messages are
 * said in), or null when they are not a member. */
export async function getMembership(userId: string, farmId: string): Promise<{ role: Role; units: UnitSystem } | null> {
  const [r] = await db()
    .select({ role: memberships.role, units: farms.unitSystem })
    .from(memberships)
    .innerJoin(farms, eq(farms.id, memberships.farmId))
    .where(and(eq(memberships.userId, userId), eq(memberships.farmId, farmId)));
  return r ?? null;
}
