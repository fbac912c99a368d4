import { eq } from "drizzle-orm";
import { db } from "@/db";
import { farms, memberships } from "@/db/schema";
import { hasChanges } from "./patch";

export async function getFarm(id: string) {
  const [f] = await db().select().from(farms).where(eq(farms.id, id));
  return f ?? null;
}

export async function createFarm(ownerId: string, input: { name: string; unitSystem: "metric" | "imperial"; timezone: string }) {
  return db().transaction(async (tx) => {
    const [farm] = await tx.insert(farms).values(input).returning();
    await tx.insert(memberships).values({ userId: ownerId, farmId: farm!.id, role: "owner" });
    return farm!;
  });
}

export async function updateFarm(id: string, patch: Partial<typeof farms.$inferInsert>) {
  if (!hasChanges(patch)) return getFarm(id);
  const [f] = await db().update(farms).set(patch).where(eq(farms.id, id)).returning();
  return f ?? null;
}
