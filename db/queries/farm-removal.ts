// Leaving and deleting farms, and deleting a person: each one transaction that locks what it
// counts, so two owners leaving at once cannot leave a farm with none.
import { and, count, eq, inArray, ne, or } from "drizzle-orm";
import { db } from "@/db";
import { farms, memberships, probes, readingRollups, readings, rejectedMessages, users } from "@/db/schema";

type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

async function lockFarm(tx: Tx, farmId: string) {
  await tx.select({ id: farms.id }).from(farms).where(eq(farms.id, farmId)).for("update");
}

async function ownersOf(tx: Tx, farmId: string) {
  const [r] = await tx
    .select({ n: count() })
    .from(memberships)
    .where(and(eq(memberships.farmId, farmId), eq(memberships.role, "owner")));
  return r?.n ?? 0;
}

/** "left", "not-member" or "last-owner" (nothing changed). */
export async function leaveFarmRow(userId: string, farmId: string) {
  return db().transaction(async (tx) => {
    await lockFarm(tx, farmId);
    const [m] = await tx
      .select()
      .from(memberships)
      .where(and(eq(memberships.userId, userId), eq(memberships.farmId, farmId)));
    if (!m) return "not-member" as const;
    if (m.role === "owner" && (await ownersOf(tx, farmId)) <= 1) return "last-owner" as const;
    await tx.delete(memberships).where(and(eq(memberships.userId, userId), eq(memberships.farmId, farmId)));
    return "left" as const;
  });
}

// Readings, rollups and refused messages name a probe or farm without a foreign key (they are the
// big tables, kept free of FK checks on insert), so they are deleted by hand; the rest cascades.
async function deleteFarmIn(tx: Tx, farmId: string) {
  const probeIds = (await tx.select({ id: probes.id }).from(probes).where(eq(probes.farmId, farmId))).map((p) => p.id);
  if (probeIds.length > 0) {
    await tx.delete(readings).where(inArray(readings.probeId, probeIds));
    await tx.delete(readingRollups).where(inArray(readingRollups.probeId, probeIds));
  }
  await tx
    .delete(rejectedMessages)
    .where(probeIds.length > 0 ? or(eq(rejectedMessages.farmId, farmId), inArray(rejectedMessages.probeId, probeIds)) : eq(rejectedMessages.farmId, farmId));
  await tx.delete(farms).where(eq(farms.id, farmId));
}

export async function deleteFarmRows(farmId: string) {
  await db().transaction((tx) => deleteFarmIn(tx, farmId));
}

/** The farms a person owns and what stands in the way of deleting them: another owner (the farm
 * stays) or other members with no other owner (refused). */
export async function deleteUserRows(userId: string): Promise<{ refused: string[] } | { deletedFarms: string[] }> {
  return db().transaction(async (tx) => {
    await tx.select({ id: users.id }).from(users).where(eq(users.id, userId)).for("update");
    const owned = await tx
      .select({ farmId: memberships.farmId, name: farms.name })
      .from(memberships)
      .innerJoin(farms, eq(farms.id, memberships.farmId))
      .where(and(eq(memberships.userId, userId), eq(memberships.role, "owner")));
    const refused: string[] = [];
    const solo: string[] = [];
    for (const f of owned) {
      await lockFarm(tx, f.farmId);
      const others = await tx
        .select({ role: memberships.role })
        .from(memberships)
        .where(and(eq(memberships.farmId, f.farmId), ne(memberships.userId, userId)));
      if (others.length === 0) solo.push(f.farmId);
      else if (!others.some((o) => o.role === "owner")) refused.push(f.name);
    }
    if (refused.length > 0) return { refused };
    for (const farmId of solo) await deleteFarmIn(tx, farmId);
    await tx.delete(users).where(eq(users.id, userId));
    return { deletedFarms: solo };
  });
}

export async function farmName(farmId: string) {
  const [f] = await db().select({ name: farms.name }).from(farms).where(eq(farms.id, farmId));
  return f?.name ?? null;
}
