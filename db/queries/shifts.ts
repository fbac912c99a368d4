import { and, eq } from "drizzle-orm";
import { db } from "@/db";
import { shifts } from "@/db/schema";

export type NewShift = {
  farmId: string;
  binId: string;
  zoneId: string;
  toZoneId: string;
  at: Date;
  byUserId: string;
  notes: string | null;
  volumeL: number | null;
  clientKey?: string;
};

/** Stores a shift once per (farm, client key): a repeat of the same key returns the stored row with
 * `created: false`; without a key every call stores a new row. */
export async function insertShift(s: NewShift): Promise<{ shift: typeof shifts.$inferSelect; created: boolean }> {
  const [row] = await db()
    .insert(shifts)
    .values(s)
    .onConflictDoNothing({ target: [shifts.farmId, shifts.clientKey] })
    .returning();
  if (row) return { shift: row, created: true };
  const [kept] = await db()
    .select()
    .from(shifts)
    .where(and(eq(shifts.farmId, s.farmId), eq(shifts.clientKey, s.clientKey!)));
  return { shift: kept!, created: false };
}
