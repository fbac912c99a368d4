import { and, eq, isNull, or } from "drizzle-orm";
import { db } from "@/db";
import { rules, type AlertKind } from "@/db/schema";

// The farm-wide rows and the bin's own rows: the rules runner lays the bin's over the farm's.
export async function listRulesForBin(farmId: string, binId: string) {
  return db()
    .select()
    .from(rules)
    .where(and(eq(rules.farmId, farmId), or(isNull(rules.binId), eq(rules.binId, binId))));
}

// Every rule row of the farm, farm-wide and per bin, of one kind (the probe list's silent-probe line).
export async function listFarmRules(farmId: string, kind: AlertKind) {
  return db()
    .select()
    .from(rules)
    .where(and(eq(rules.farmId, farmId), eq(rules.kind, kind)));
}

export async function upsertBinRule(farmId: string, binId: string, kind: AlertKind, thresholds: Record<string, number>, enabled: boolean) {
  const [row] = await db()
    .insert(rules)
    .values({ farmId, binId, kind, thresholds, enabled })
    .onConflictDoUpdate({ target: [rules.farmId, rules.binId, rules.kind], set: { thresholds, enabled, updatedAt: new Date() } })
    .returning();
  return row!;
}

export async function deleteBinRule(farmId: string, binId: string, kind: AlertKind) {
  const rows = await db()
    .delete(rules)
    .where(and(eq(rules.farmId, farmId), eq(rules.binId, binId), eq(rules.kind, kind)))
    .returning({ id: rules.id });
  return rows.length;
}
