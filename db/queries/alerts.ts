import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import { db } from "@/db";
import { alertEvents, alerts, bins, users, zones } from "@/db/schema";
import { AppError } from "@/lib/errors";

export async function listAlerts(farmId: string, opts: { open?: boolean; limit?: number } = {}) {
  const where = opts.open
    ? and(eq(alerts.farmId, farmId), inArray(alerts.state, ["raised", "claimed"]))
    : eq(alerts.farmId, farmId);
  return db()
    .select({
      alert: alerts,
      binName: bins.name,
      zoneKind: zones.kind,
      claimedByName: users.name,
    })
    .from(alerts)
    .innerJoin(bins, eq(bins.id, alerts.binId))
    .leftJoin(zones, eq(zones.id, alerts.zoneId))
    .leftJoin(users, eq(users.id, alerts.claimedBy))
    .where(where)
    .orderBy(desc(alerts.raisedAt))
    .limit(opts.limit ?? 100);
}

export async function getAlert(id: string) {
  const [a] = await db().select().from(alerts).where(eq(alerts.id, id));
  if (!a) return null;
  const events = await db()
    .select({ event: alertEvents, userName: users.name })
    .from(alertEvents)
    .leftJoin(users, eq(users.id, alertEvents.userId))
    .where(eq(alertEvents.alertId, id))
    .orderBy(asc(alertEvents.at), asc(alertEvents.id));
  return { ...a, events: events.map((e) => ({ ...e.event, userName: e.userName })) };
}

// Claim is a compare-and-set on the state so two keepers tapping at once get one winner.
export async function claimAlert(id: string, userId: string) {
  return db().transaction(async (tx) => {
    const [a] = await tx
      .update(alerts)
      .set({ state: "claimed", claimedAt: new Date(), claimedBy: userId })
      .where(and(eq(alerts.id, id), eq(alerts.state, "raised")))
      .returning();
    if (!a) {
      const [cur] = await tx
        .select({ state: alerts.state, claimedBy: users.name })
        .from(alerts)
        .leftJoin(users, eq(users.id, alerts.claimedBy))
        .where(eq(alerts.id, id));
      if (cur?.state === "claimed") throw new AppError("conflict", `Already claimed by ${cur.claimedBy ?? "someone"}.`);
      throw new AppError("conflict", "This alert has already settled.");
    }
    await tx.insert(alertEvents).values({ alertId: id, type: "claimed", userId });
    return a;
  });
}

export async function settleAlert(id: string, userId: string | null, note?: string) {
  return db().transaction(async (tx) => {
    const [a] = await tx
      .update(alerts)
      .set({ state: "settled", settledAt: new Date() })
      .where(and(eq(alerts.id, id), inArray(alerts.state, ["raised", "claimed"])))
      .returning();
    if (!a) throw new AppError("conflict", "This alert has already settled.");
    await tx.insert(alertEvents).values({ alertId: id, type: "settled", userId, detail: note ? { note } : {} });
    return a;
  });
}

export async function countOpenAlerts(farmId: string) {
  const r = await db()
    .select({ n: sql<number>`count(*)::int` })
    .from(alerts)
    .where(and(eq(alerts.farmId, farmId), inArray(alerts.state, ["raised", "claimed"])));
  return r[0]?.n ?? 0;
}
