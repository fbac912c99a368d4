import { and, desc, eq, inArray, lte, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { signInFailures } from "@/db/schema";

export type TryLimit = { key: string; max: number };
export type TryTaken = { ok: true; ids: number[] } | { ok: false; retryAt: Date };

// Takes one try for every key, counted as a failure until the caller forgets it, unless a key
// already has `max` failures in the window. Counting and taking happen under a lock per key, so a
// burst of parallel guesses cannot all slip under the limit while bcrypt is busy with the first.
export async function takeSignInTry(limits: TryLimit[], windowMs: number, now = new Date()): Promise<TryTaken> {
  const since = new Date(now.getTime() - windowMs);
  const keys = limits.map((l) => l.key);
  return db().transaction(async (tx) => {
    // Sorted, so two attempts locking the same two keys always lock them in one order.
    for (const key of [...keys].sort()) await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${key}, 0))`);
    await tx.delete(signInFailures).where(and(inArray(signInFailures.key, keys), lte(signInFailures.at, since)));
    let retryAt: Date | null = null;
    for (const { key, max } of limits) {
      // The max-th newest failure: once it leaves the window, the key is under its limit again.
      const [edge] = await tx
        .select({ at: signInFailures.at })
        .from(signInFailures)
        .where(eq(signInFailures.key, key))
        .orderBy(desc(signInFailures.at))
        .offset(max - 1)
        .limit(1);
      if (edge) {
        const free = new Date(edge.at.getTime() + windowMs);
        if (!retryAt || free > retryAt) retryAt = free;
      }
    }
    if (retryAt) return { ok: false as const, retryAt };
    const rows = await tx
      .insert(signInFailures)
      .values(keys.map((key) => ({ key, at: now })))
      .returning({ id: signInFailures.id });
    return { ok: true as const, ids: rows.map((r) => r.id) };
  });
}

// A right password: the try taken for it was no failure, and the account starts afresh.
export async function forgetSignInTry(ids: number[], accountKey: string) {
  await db()
    .delete(signInFailures)
    .where(or(inArray(signInFailures.id, ids), eq(signInFailures.key, accountKey)));
}

// Failures of keys nobody tries again (a sprayed list of e-mails) would stay for ever; a few at a
// time, skipping rows another attempt holds.
export async function pruneSignInFailures(before: Date) {
  await db().execute(sql`
    delete from ${signInFailures} where ${signInFailures.id} in (
      select ${signInFailures.id} from ${signInFailures} where ${signInFailures.at} < ${before}
      limit 500 for update skip locked)`);
}
