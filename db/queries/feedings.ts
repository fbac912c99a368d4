import { and, desc, eq, gte, inArray } from "drizzle-orm";
import { db } from "@/db";
import { feedingItems, feedings, users } from "@/db/schema";

export type NewFeeding = {
  farmId: string;
  binId: string;
  zoneId: string | null;
  at: Date;
  byUserId: string;
  notes: string | null;
  /** The phone's idempotency key: one feeding per farm and key. */
  clientKey?: string | null;
  mixMoisturePct: number | null;
  mixCn: number | null;
  totalKg: number;
  items: { ingredientId: string | null; name: string; massKg: number; moisturePct: number; carbonPct: number | null; nitrogenPct: number | null }[];
};

/** Stores a feeding and its items, and answers them as stored. Under a clientKey the farm already
 * used (`on conflict (farm_id, client_key) do nothing`), nothing is added and the feeding stored the
 * first time is answered, with `created` false. */
export async function insertFeeding(f: NewFeeding) {
  return db().transaction(async (tx) => {
    const { items, ...row } = f;
    const [feeding] = await tx
      .insert(feedings)
      .values(row)
      .onConflictDoNothing({ target: [feedings.farmId, feedings.clientKey] })
      .returning();
    if (feeding) {
      const stored = await tx
        .insert(feedingItems)
        .values(items.map((i) => ({ ...i, feedingId: feeding.id })))
        .returning();
      return { feeding, items: stored, created: true };
    }
    const [existing] = await tx
      .select()
      .from(feedings)
      .where(and(eq(feedings.farmId, f.farmId), eq(feedings.clientKey, f.clientKey ?? "")));
    const stored = await tx.select().from(feedingItems).where(eq(feedingItems.feedingId, existing!.id));
    return { feeding: existing!, items: stored, created: false };
  });
}

// A bin's feedings, newest first, each with its items and who logged it (for the logbook and chart marks).
export async function listFeedings(binId: string, opts: { since?: Date; limit?: number } = {}) {
  const where = opts.since ? and(eq(feedings.binId, binId), gte(feedings.at, opts.since)) : eq(feedings.binId, binId);
  const rows = await db()
    .select({ feeding: feedings, byName: users.name })
    .from(feedings)
    .leftJoin(users, eq(users.id, feedings.byUserId))
    .where(where)
    .orderBy(desc(feedings.at))
    .limit(opts.limit ?? 50);
  const ids = rows.map((r) => r.feeding.id);
  const items = ids.length ? await db().select().from(feedingItems).where(inArray(feedingItems.feedingId, ids)) : [];
  return rows.map((r) => ({ ...r.feeding, byName: r.byName, items: items.filter((i) => i.feedingId === r.feeding.id) }));
}
export type FeedingEntry = Awaited<ReturnType<typeof listFeedings>>[number];
