import { and, eq, inArray } from "drizzle-orm";
import { db } from "@/db";
import { memberships, pushSubscriptions, users } from "@/db/schema";

export async function savePushSubscription(userId: string, sub: { endpoint: string; p256dh: string; auth: string; userAgent?: string | null }) {
  // A browser re-subscribing keeps one row per person and endpoint; another person's row is never touched.
  const [row] = await db()
    .insert(pushSubscriptions)
    .values({ userId, ...sub })
    .onConflictDoUpdate({
      target: [pushSubscriptions.userId, pushSubscriptions.endpoint],
      set: { p256dh: sub.p256dh, auth: sub.auth, userAgent: sub.userAgent ?? null },
    })
    .returning();
  return row!;
}

export async function deletePushSubscription(userId: string, endpoint: string) {
  const rows = await db()
    .delete(pushSubscriptions)
    .where(and(eq(pushSubscriptions.userId, userId), eq(pushSubscriptions.endpoint, endpoint)))
    .returning({ id: pushSubscriptions.id });
  return rows.length;
}

export async function deletePushSubscriptionById(id: string) {
  await db().delete(pushSubscriptions).where(eq(pushSubscriptions.id, id));
}

export async function listPushSubscriptions(userIds: string[]) {
  if (userIds.length === 0) return [];
  return db().select().from(pushSubscriptions).where(inArray(pushSubscriptions.userId, userIds));
}

// Who hears about a farm's alerts: its owners and keepers (viewers only read).
export async function listCrew(farmId: string) {
  return db()
    .select({
      id: users.id,
      name: users.name,
      email: users.email,
      role: memberships.role,
      quietFrom: users.quietFrom,
      quietTo: users.quietTo,
      timezone: users.timezone,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.farmId, farmId), inArray(memberships.role, ["owner", "keeper"])));
}

export async function isCrewAnywhere(userId: string) {
  const r = await db()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.userId, userId), inArray(memberships.role, ["owner", "keeper"])))
    .limit(1);
  return r.length > 0;
}

export async function updateQuietHours(userId: string, patch: { quietFrom?: string | null; quietTo?: string | null; timezone?: string }) {
  const [u] = await db().update(users).set(patch).where(eq(users.id, userId)).returning({
    quietFrom: users.quietFrom,
    quietTo: users.quietTo,
    timezone: users.timezone,
  });
  return u ?? null;
}
