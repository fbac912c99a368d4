import { and, desc, eq, gte } from "drizzle-orm";
import { db } from "@/db";
import { feedingItems, feedings, zones } from "@/db/schema";
import { AppError } from "@/lib/errors";

export type NewFeeding = {
  farmId: string;
  binId: string;
  zoneId: string | null;
  at: Date;
  byUserId: string;
  notes: string | null;
  mixMoisturePct: number | null;
  mixCn: number | null;
  totalKg: number;
  items: { ingredientId: string | null; name: string; massKg: number; moisturePct: number; carbonPct: number | null; nitrogenPct: number | null }[];
};

export async function insertFeeding(f: NewFeeding) {
  return db().transaction(async (tx) => {
    if (f.zoneId) {
      const [z] = await tx.select({ binId: zones.binId }).from(zones).where(eq(zones.id, f.zoneId));
      if (z?.binId !== f.binId) throw new AppError("invalid", "That zone is not in this bin.", "zoneId");
    }
    const { items, ...row } = f;
    const [feeding] = await tx.insert(feedings).values(row).returning();
    await tx.insert(feedingItems).values(items.map((i) => ({ ...i, feedingId: feeding!.id })));
    return feeding!;
  });
}

export async function listFeedings(binId: string, opts: { since?: Date; limit?: number } = {}) {
  const where = opts.since ? and(eq(feedings.binId, binId), gte(feedings.at, opts.since)) : eq(feedings.binId, binId);
  const rows = await db().select().from(feedings).where(where).orderBy(desc(feedings.at)).limit(opts.limit ?? 50);
  return rows;
}
