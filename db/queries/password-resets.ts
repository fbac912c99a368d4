import { and, eq, gt, gte, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { passwordResets, users } from "@/db/schema";

// Stores a reset unless the user already had `limit` since `since`; the user row is locked so
// two requests at once cannot both slip under the limit. Returns false when held back.
export async function createPasswordReset(input: { userId: string; tokenHash: string; expiresAt: Date; createdAt: Date }, limit: { max: number; since: Date }) {
  return db().transaction(async (tx) => {
    await tx.select({ id: users.id }).from(users).where(eq(users.id, input.userId)).for("update");
    const [n] = await tx
      .select({ n: sql<number>`count(*)::int` })
      .from(passwordResets)
      .where(and(eq(passwordResets.userId, input.userId), gte(passwordResets.createdAt, limit.since)));
    if ((n?.n ?? 0) >= limit.max) return false;
    await tx.insert(passwordResets).values(input);
    return true;
  });
}

export async function getPasswordReset(tokenHash: string) {
  const [r] = await db()
    .select({ reset: passwordResets, email: users.email })
    .from(passwordResets)
    .innerJoin(users, eq(users.id, passwordResets.userId))
    .where(eq(passwordResets.tokenHash, tokenHash));
  return r ?? null;
}

// Single use: a compare-and-set on used_at takes the link; the user's other open links go with it.
export async function consumePasswordReset(tokenHash: string, passwordHash: string, now = new Date()) {
  return db().transaction(async (tx) => {
    const [r] = await tx
      .update(passwordResets)
      .set({ usedAt: now })
      .where(and(eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, now)))
      .returning({ userId: passwordResets.userId });
    if (!r) return null;
    // A new session version ends every session signed in with the old password (lib/server/auth/session-version).
    await tx
      .update(users)
      .set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1` })
      .where(eq(users.id, r.userId));
    await tx
      .update(passwordResets)
      .set({ usedAt: now })
      .where(and(eq(passwordResets.userId, r.userId), isNull(passwordResets.usedAt)));
    return { userId: r.userId };
  });
}
