// The delivery outbox: rows are added by lib/server/alerts/notify.ts and taken by the delivery workers of
// any ingest node. A row is claimed with FOR UPDATE SKIP LOCKED and a lease, so two workers never
// hold one row at once; a worker that dies mid-send leaves a lease that runs out and the row is
// sent again (the push Topic lets the push service collapse the two).
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { alertEvents, alerts, deliveries, pushSubscriptions, users, type Delivery } from "@/db/schema";

export const DELIVERIES_CHANNEL = "wormward_deliveries";

export type NewDelivery = {
  dedupeKey: string;
  farmId: string | null;
  alertId: string | null;
  userId: string;
  subscriptionId?: string | null;
  channel: "push" | "email";
  reason: string;
  payload: Record<string, unknown>;
};

type EventRow = typeof alertEvents.$inferInsert;

// One transaction: the rows, the alert events that go with them (e.g. "held"), the alert's
// last_sent_at when `sent` is given (so an alert is marked notified exactly when its rows exist, and
// the sweep's recovery, listUnnotifiedAlerts, never queues its held events twice), and a NOTIFY that
// wakes the workers on commit. A repeated dedupe key adds nothing.
// With `sent.unless`, the mark is a compare-and-set on the last_sent_at the caller read: when another
// node has queued this alert meanwhile, nothing is added and the result is null.
export async function enqueueDeliveries(
  rows: NewDelivery[],
  events: EventRow[] = [],
  sent?: { alertId: string; at: Date; unlessSentSince?: { lastSentAt: Date | null } },
): Promise<number | null> {
  if (rows.length === 0 && events.length === 0 && !sent) return 0;
  return db().transaction(async (tx) => {
    if (sent) {
      const seen = sent.unlessSentSince;
      const marked = await tx
        .update(alerts)
        .set({ lastSentAt: sent.at })
        .where(and(eq(alerts.id, sent.alertId), seen ? (seen.lastSentAt ? eq(alerts.lastSentAt, seen.lastSentAt) : isNull(alerts.lastSentAt)) : undefined))
        .returning({ id: alerts.id });
      if (seen && marked.length === 0) return null;
    }
    let added = 0;
    if (rows.length) {
      const r = await tx
        .insert(deliveries)
        .values(rows.map((d) => ({ ...d, subscriptionId: d.subscriptionId ?? null })))
        .onConflictDoNothing({ target: deliveries.dedupeKey })
        .returning({ id: deliveries.id });
      added = r.length;
      if (added) await tx.execute(sql`select pg_notify(${DELIVERIES_CHANNEL}, '')`);
    }
    if (events.length) await tx.insert(alertEvents).values(events);
    return added;
  });
}

export type ClaimedDelivery = Delivery & {
  endpoint: string | null;
  p256dh: string | null;
  auth: string | null;
  email: string | null;
};

// Takes up to `limit` due rows for `leaseMs`. A farm gets at most `perFarm` rows in flight, counting
// those already out on any node and those taken in this claim, so one farm's many hanging
// endpoints can never fill a worker's slots. (FOR UPDATE cannot sit beside a window function,
// hence the ranking first and the lock after; the lock re-checks that each row is still free.)
export async function claimDeliveries(limit: number, leaseMs: number, perFarm: number): Promise<ClaimedDelivery[]> {
  if (limit <= 0) return [];
  const r = await db().execute(sql`
    with due as (
      select id, farm_id, next_attempt_at,
             row_number() over (partition by farm_id order by next_attempt_at, id) as nth
      from deliveries
      where state in ('pending', 'sending') and next_attempt_at <= now()
        and (locked_until is null or locked_until < now())
      order by next_attempt_at, id
      limit ${Math.max(limit * 20, 200)}),
    busy as (
      select farm_id, count(*) as n from deliveries
      where state = 'sending' and locked_until >= now() and farm_id is not null
      group by farm_id),
    pick as (
      select due.id from due left join busy on busy.farm_id = due.farm_id
      where due.farm_id is null or due.nth + coalesce(busy.n, 0) <= ${perFarm}
      order by due.next_attempt_at, due.id
      limit ${limit}),
    free as (
      select d.id from deliveries d
      where d.id in (select id from pick)
        and d.state in ('pending', 'sending') and (d.locked_until is null or d.locked_until < now())
      for update skip locked)
    update deliveries d
    set state = 'sending', attempts = d.attempts + 1, locked_until = now() + ${leaseMs} * interval '1 millisecond'
    from free where d.id = free.id
    returning d.id`);
  const ids = (r.rows as { id: string | number }[]).map((x) => Number(x.id));
  if (ids.length === 0) return [];
  const rows = await db()
    .select({ d: deliveries, endpoint: pushSubscriptions.endpoint, p256dh: pushSubscriptions.p256dh, auth: pushSubscriptions.auth, email: users.email })
    .from(deliveries)
    .leftJoin(pushSubscriptions, eq(pushSubscriptions.id, deliveries.subscriptionId))
    .leftJoin(users, eq(users.id, deliveries.userId))
    .where(inArray(deliveries.id, ids));
  return rows.map((x) => ({ ...x.d, endpoint: x.endpoint, p256dh: x.p256dh, auth: x.auth, email: x.email }));
}

// The next time a row falls due, so an idle worker sleeps just long enough.
export async function nextDueIn(): Promise<number | null> {
  const r = await db().execute(sql`
    select (extract(epoch from (min(greatest(next_attempt_at, coalesce(locked_until, next_attempt_at))) - now())) * 1000)::float8 as ms
    from deliveries where state in ('pending', 'sending')`);
  const ms = (r.rows[0] as { ms: number | null } | undefined)?.ms;
  return ms == null ? null : Math.max(0, Number(ms));
}

// Another try later. Guarded by the attempt number: a worker whose lease ran out changes nothing.
export async function retryDelivery(d: Pick<Delivery, "id" | "attempts">, inMs: number, status: number | null, reason: string) {
  const r = await db()
    .update(deliveries)
    .set({
      state: "pending",
      nextAttemptAt: sql`now() + ${Math.round(inMs)} * interval '1 millisecond'`,
      lockedUntil: null,
      lastStatus: status,
      lastReason: reason,
    })
    .where(and(eq(deliveries.id, d.id), eq(deliveries.state, "sending"), eq(deliveries.attempts, d.attempts)))
    .returning({ id: deliveries.id });
  return r.length === 1;
}

export type Ending = {
  state: "sent" | "failed" | "gone" | "dropped";
  status: number | null;
  reason: string | null;
  // The alert event of this send (sent / send_failed), when the row belongs to an alert.
  event?: EventRow | null;
  // An e-mail to this person when none of their push deliveries of this notification got through.
  mailFallback?: NewDelivery | null;
};

// Ends a delivery. For a push row this also decides the e-mail fallback: under a lock on the
// notification (alert, reason, person) so two workers ending a person's last two pushes at once
// cannot both think the other is still trying. A gone subscription is deleted last (RFC 8030 §7.3);
// its outbox rows go with it.
export async function endDelivery(d: Pick<Delivery, "id" | "attempts" | "alertId" | "reason" | "userId" | "channel" | "subscriptionId">, end: Ending) {
  return db().transaction(async (tx) => {
    const notification = `${d.alertId ?? ""}|${d.reason}|${d.userId ?? ""}`;
    if (d.channel === "push") await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${notification}))`);
    const done = await tx
      .update(deliveries)
      .set({ state: end.state, lockedUntil: null, lastStatus: end.status, lastReason: end.reason, ...(end.state === "sent" ? { sentAt: sql`now()` } : {}) })
      .where(and(eq(deliveries.id, d.id), eq(deliveries.state, "sending"), eq(deliveries.attempts, d.attempts)))
      .returning({ id: deliveries.id });
    if (done.length === 0) return { ended: false, mailed: false };
    if (end.event) await tx.insert(alertEvents).values(end.event);
    let mailed = false;
    if (d.channel === "push" && end.state !== "sent" && end.mailFallback && d.alertId && d.userId) {
      const [left] = (
        await tx.execute(sql`
          select count(*) filter (where state in ('pending', 'sending'))::int as open,
                 count(*) filter (where state = 'sent')::int as sent
          from deliveries
          where alert_id = ${d.alertId} and reason = ${d.reason} and user_id = ${d.userId} and channel = 'push'`)
      ).rows as { open: number; sent: number }[];
      if (left && left.open === 0 && left.sent === 0) {
        const m = end.mailFallback;
        const r = await tx
          .insert(deliveries)
          .values({ ...m, subscriptionId: null })
          .onConflictDoNothing({ target: deliveries.dedupeKey })
          .returning({ id: deliveries.id });
        mailed = r.length > 0;
        if (mailed) await tx.execute(sql`select pg_notify(${DELIVERIES_CHANNEL}, '')`);
      }
    }
    if (end.state === "gone" && d.subscriptionId) await tx.delete(pushSubscriptions).where(eq(pushSubscriptions.id, d.subscriptionId));
    return { ended: true, mailed };
  });
}

// Finished rows are kept a week for the record, then removed.
export async function pruneDeliveries(olderThanMs = 7 * 24 * 3600_000) {
  const r = await db()
    .delete(deliveries)
    .where(
      and(inArray(deliveries.state, ["sent", "failed", "gone", "dropped"]), sql`${deliveries.createdAt} < now() - ${olderThanMs} * interval '1 millisecond'`),
    )
    .returning({ id: deliveries.id });
  return r.length;
}

export async function listDeliveries(where: { alertId?: string; userId?: string }) {
  const conds = [...(where.alertId ? [eq(deliveries.alertId, where.alertId)] : []), ...(where.userId ? [eq(deliveries.userId, where.userId)] : [])];
  return db()
    .select()
    .from(deliveries)
    .where(conds.length ? and(...conds) : undefined)
    .orderBy(deliveries.id);
}
