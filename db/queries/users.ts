import { and, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { farms, memberships, users } from "@/db/schema";

export async function getUserByEmail(email: string) {
  const [u] = await db()
    .select()
    .from(users)
    .where(sql`lower(${users.email}) = lower(${email})`);
  return u ?? null;
}

export async function getUser(id: string) {
  const [u] = await db().select().from(users).where(eq(users.id, id));
  return u ?? null;
}

export async function listMyFarms(userId: string) {
  return db()
    .select({ id: farms.id, name: farms.name, role: memberships.role, unitSystem: farms.unitSystem, timezone: farms.timezone })
    .from(memberships)
    .innerJoin(farms, eq(farms.id, memberships.farmId))
    .where(eq(memberships.userId, userId))
    .orderBy(farms.name);
}

// Raised by a password reset; a session signed in under an older one is over.
export async function getSessionVersion(id: string) {
  const [u] = await db().select({ v: users.sessionVersion }).from(users).where(eq(users.id, id));
  return u?.v ?? null;
}

// Null when the e-mail already has an account (unique on lower(email)).
export async function insertUser(input: { email: string; name: string; passwordHash: string; timezone?: string }) {
  const [u] = await db().insert(users).values(input).onConflictDoNothing().returning();
  return u ?? null;
}

// Compare-and-set: a password reset that landed meanwhile is never overwritten by the old password.
export async function replacePasswordHash(id: string, from: string, to: string) {
  await db()
    .update(users)
    .set({ passwordHash: to })
    .where(and(eq(users.id, id), eq(users.passwordHash, from)));
}
