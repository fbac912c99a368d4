import { and, eq, gt, gte, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { emailVerifications, users } from "@/db/schema";

// A new account whose address is not confirmed yet; null when the address already has one.
export async function insertUnverifiedUser(input: { email: string; name: string; passwordHash: string }) {
  const [u] = await db()
    .insert(users)
    .values({ ...input, emailVerifiedAt: null })
    .onConflictDoNothing()
    .returning();
  return u ?? null;
}

// Stores a sign-up mail unless the person already had `max` since `since`; the user row is locked
// so two requests at once cannot both slip under the limit. False when held back.
export async function createEmailVerification(
  input: { userId: string; kind: "verify" | "notice"; tokenHash: string; expiresAt: Date; createdAt: Date },
  limit: { max: number; since: Date },
) {
  return db().transaction(async (tx) => {
    await tx.select({ id: users.id }).from(users).where(eq(users.id, input.userId)).for("update");
    const [n] = await tx
      .select({ n: sql<number>`count(*)::int` })
      .from(emailVerifications)
      .where(and(eq(emailVerifications.userId, input.userId), gte(emailVerifications.createdAt, limit.since)));
    if ((n?.n ?? 0) >= limit.max) return false;
    await tx.insert(emailVerifications).values(input);
    return true;
  });
}

export async function getEmailVerification(tokenHash: string) {
  const [r] = await db()
    .select({ link: emailVerifications, email: users.email })
    .from(emailVerifications)
    .innerJoin(users, eq(users.id, emailVerifications.userId))
    .where(and(eq(emailVerifications.tokenHash, tokenHash), eq(emailVerifications.kind, "verify")));
  return r ?? null;
}

// Single use: a compare-and-set on used_at takes the link; the person's other open links go with it.
export async function consumeEmailVerification(tokenHash: string, now: Date) {
  return db().transaction(async (tx) => {
    const [r] = await tx
      .update(emailVerifications)
      .set({ usedAt: now })
      .where(
        and(
          eq(emailVerifications.tokenHash, tokenHash),
          eq(emailVerifications.kind, "verify"),
          isNull(emailVerifications.usedAt),
          gt(emailVerifications.expiresAt, now),
        ),
      )
      .returning({ userId: emailVerifications.userId });
    if (!r) return null;
    await tx
      .update(users)
      .set({ emailVerifiedAt: sql`coalesce(${users.emailVerifiedAt}, ${now.toISOString()}::timestamptz)` })
      .where(eq(users.id, r.userId));
    await tx
      .update(emailVerifications)
      .set({ usedAt: now })
      .where(and(eq(emailVerifications.userId, r.userId), isNull(emailVerifications.usedAt)));
    return { userId: r.userId };
  });
}
