import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import { db } from "@/db";
import { alertEvents, alerts, bins, users, zones, type Alert } from "@/db/schema";
import type { AlertKind, AlertLevel, AlertState } from "@/lib/domain/vocabulary";

export type AlertFilters = {
  /** "open" = raised or claimed. */
  state?: AlertState | "open";
  binId?: string;
  kind?: AlertKind;
  level?: AlertLevel;
  /** Only alerts raised before this instant (ISO text, microseconds kept): the history's "older" page.
   * With beforeId, alerts raised at that very instant with a smaller id come too. */
  before?: string;
  beforeId?: string;
};

// A farm's alerts, newest first, narrowed by any of bin, kind, level and state.
export async function listAlerts(farmId: string, opts: AlertFilters & { open?: boolean; limit?: number } = {}) {
  const state = opts.open ? "open" : opts.state;
  const where = and(
    eq(alerts.farmId, farmId),
    state === "open" ? inArray(alerts.state, ["raised", "claimed"]) : state ? eq(alerts.state, state) : undefined,
    opts.binId ? eq(alerts.binId, opts.binId) : undefined,
    opts.kind ? eq(alerts.kind, opts.kind) : undefined,
    opts.level ? eq(alerts.level, opts.level) : undefined,
    opts.before
      ? opts.beforeId
        ? sql`(${alerts.raisedAt}, ${alerts.id}) < (${opts.before}::timestamptz, ${opts.beforeId}::uuid)`
        : sql`${alerts.raisedAt} < ${opts.before}::timestamptz`
      : undefined,
  );
  return db()
    .select({
      alert: alerts,
      binName: bins.name,
      zoneKind: zones.kind,
      zoneName: zones.name,
      claimedByName: users.name,
      raisedMessage: raisedMessage(),
      // The raise time to the microsecond, for the next page's cursor (a Date keeps milliseconds).
      raisedAtExact: sql<string>`to_char(${alerts.raisedAt} at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"')`,
    })
    .from(alerts)
    .innerJoin(bins, eq(bins.id, alerts.binId))
    .leftJoin(zones, eq(zones.id, alerts.zoneId))
    .leftJoin(users, eq(users.id, alerts.claimedBy))
    .where(where)
    .orderBy(desc(alerts.raisedAt), desc(alerts.id))
    .limit(opts.limit ?? 100);
}

/** One alert with where it is (bin, zone) and who holds it; null when there is none. */
export async function getAlertWithPlace(id: string) {
  const [r] = await db()
    .select({ alert: alerts, binName: bins.name, species: bins.species, zoneKind: zones.kind, zoneName: zones.name, claimedByName: users.name })
    .from(alerts)
    .innerJoin(bins, eq(bins.id, alerts.binId))
    .leftJoin(zones, eq(zones.id, alerts.zoneId))
    .leftJoin(users, eq(users.id, alerts.claimedBy))
    .where(eq(alerts.id, id));
  return r ?? null;
}

/** An alert's events in order, with the name of the person each concerns. */
export async function listAlertEvents(alertId: string) {
  const rows = await db()
    .select({ event: alertEvents, userName: users.name })
    .from(alertEvents)
    .leftJoin(users, eq(users.id, alertEvents.userId))
    .where(eq(alertEvents.alertId, alertId))
    .orderBy(asc(alertEvents.at), asc(alertEvents.id));
  return rows.map((e) => ({ ...e.event, userName: e.userName }));
}

// The words an alert was raised with, kept on its 'raised' event while the row's message follows the readings.
const raisedMessage = () =>
  sql<string | null>`(select e.detail->>'message' from alert_events e where e.alert_id = ${alerts.id} and e.type = 'raised' order by e.at limit 1)`;

/** The open alerts of one zone, act now first, then newest. */
export async function listOpenZoneAlerts(zoneId: string) {
  return db()
    .select({ alert: alerts, claimedByName: users.name, raisedMessage: raisedMessage() })
    .from(alerts)
    .leftJoin(users, eq(users.id, alerts.claimedBy))
    .where(and(eq(alerts.zoneId, zoneId), inArray(alerts.state, ["raised", "claimed"])))
    .orderBy(sql`${alerts.level} = 'act_now' desc`, desc(alerts.raisedAt));
}

export async function getAlert(id: string) {
  const [a] = await db().select().from(alerts).where(eq(alerts.id, id));
  if (!a) return null;
  return { ...a, events: await listAlertEvents(id) };
}

// Claim is a compare-and-set on the state so two keepers tapping at once get one winner. When it
// loses, the answer says what the alert is now and who holds it.
export async function claimAlert(
  id: string,
  userId: string,
): Promise<{ claimed: Alert } | { claimed: null; state: Alert["state"] | null; claimedByName: string | null }> {
  return db().transaction(async (tx) => {
    const [a] = await tx
      .update(alerts)
      .set({ state: "claimed", claimedAt: new Date(), claimedBy: userId })
      .where(and(eq(alerts.id, id), eq(alerts.state, "raised")))
      .returning();
    if (!a) {
      const [cur] = await tx
        .select({ state: alerts.state, claimedBy: users.name })
        .from(alerts)
        .leftJoin(users, eq(users.id, alerts.claimedBy))
        .where(eq(alerts.id, id));
      return { claimed: null, state: cur?.state ?? null, claimedByName: cur?.claimedBy ?? null };
    }
    await tx.insert(alertEvents).values({ alertId: id, type: "claimed", userId });
    return { claimed: a };
  });
}

// "Not me after all": a claimed alert goes back to raised, so the crew sees it unclaimed again.
// Compare-and-set on the state; null when it was not claimed (raised already, or settled).
export async function releaseClaim(id: string, userId: string): Promise<Alert | null> {
  return db().transaction(async (tx) => {
    const [a] = await tx
      .update(alerts)
      .set({ state: "raised", claimedAt: null, claimedBy: null })
      .where(and(eq(alerts.id, id), eq(alerts.state, "claimed")))
      .returning();
    if (!a) return null;
    await tx.insert(alertEvents).values({ alertId: id, type: "released", userId, detail: { claim: true } });
    return a;
  });
}

// null when the alert had already settled.
export async function settleAlert(id: string, userId: string | null, note?: string): Promise<Alert | null> {
  return db().transaction(async (tx) => {
    const [a] = await tx
      .update(alerts)
      .set({ state: "settled", settledAt: new Date() })
      .where(and(eq(alerts.id, id), inArray(alerts.state, ["raised", "claimed"])))
      .returning();
    if (!a) return null;
    await tx.insert(alertEvents).values({ alertId: id, type: "settled", userId, detail: note ? { note } : {} });
    return a;
  });
}

export async function countOpenAlerts(farmId: string) {
  const r = await db()
    .select({ n: sql<number>`count(*)::int` })
    .from(alerts)
    .where(and(eq(alerts.farmId, farmId), inArray(alerts.state, ["raised", "claimed"])));
  return r[0]?.n ?? 0;
}

export type AlertSubject = {
  farmId: string;
  binId: string;
  zoneId: string | null;
  probeId: number | null;
  subject: string;
  kind: (typeof alerts.$inferInsert)["kind"];
  level: (typeof alerts.$inferInsert)["level"];
  value: number | null;
  message: string;
  details: Record<string, unknown>;
};

// Raises an alert unless one is already open for the subject: the partial unique index makes
// this safe when two ingest nodes race (the loser inserts nothing). Returns the new row or null.
export async function raiseAlert(a: AlertSubject, at = new Date()) {
  return db().transaction(async (tx) => {
    const rows = await tx.execute(sql`
      insert into alerts (farm_id, bin_id, zone_id, probe_id, subject, kind, level, value, message, details, raised_at, act_now_at)
      values (${a.farmId}, ${a.binId}, ${a.zoneId}, ${a.probeId}, ${a.subject}, ${a.kind}, ${a.level}, ${a.value},
              ${a.message}, ${JSON.stringify(a.details)}::jsonb, ${at.toISOString()},
              ${a.level === "act_now" ? at.toISOString() : null})
      on conflict (subject) where state <> 'settled' do nothing
      returning id`);
    const id = (rows.rows[0] as { id: string } | undefined)?.id;
    if (!id) return null;
    await tx.insert(alertEvents).values({ alertId: id, type: "raised", at, detail: { level: a.level, value: a.value, message: a.message } });
    const [row] = await tx.select().from(alerts).where(eq(alerts.id, id));
    return row ?? null;
  });
}

// heads-up → act now on the open alert of a subject; null when there is none or it already is.
export async function escalateAlert(subject: string, update: { value: number | null; message: string; details: Record<string, unknown> }, at = new Date()) {
  return db().transaction(async (tx) => {
    const [row] = await tx
      .update(alerts)
      .set({ level: "act_now", actNowAt: at, value: update.value, message: update.message, details: update.details })
      .where(and(eq(alerts.subject, subject), inArray(alerts.state, ["raised", "claimed"]), eq(alerts.level, "heads_up")))
      .returning();
    if (!row) return null;
    await tx.insert(alertEvents).values({ alertId: row.id, type: "escalated", at, detail: { value: update.value, message: update.message } });
    return row;
  });
}

export async function updateOpenAlert(subject: string, update: { value: number | null; message: string; details: Record<string, unknown> }) {
  const [row] = await db()
    .update(alerts)
    .set(update)
    .where(and(eq(alerts.subject, subject), inArray(alerts.state, ["raised", "claimed"])))
    .returning();
  return row ?? null;
}

// Settles the open alert of a subject because the condition cleared (no person: the rules did it).
export async function settleOpenAlert(subject: string, detail: Record<string, unknown>, at = new Date()) {
  return db().transaction(async (tx) => {
    const [row] = await tx
      .update(alerts)
      .set({ state: "settled", settledAt: at })
      .where(and(eq(alerts.subject, subject), inArray(alerts.state, ["raised", "claimed"])))
      .returning();
    if (!row) return null;
    await tx.insert(alertEvents).values({ alertId: row.id, type: "settled", at, detail });
    return row;
  });
}

export async function recordAlertEvents(rows: (typeof alertEvents.$inferInsert)[]) {
  if (rows.length) await db().insert(alertEvents).values(rows);
}

// Open alerts whose raise or escalation committed but whose deliveries were never queued: the
// process died (kill -9, a lost database) between the two, and no later evaluation would queue them,
// since it finds the alert already open. Queueing marks last_sent_at in the same transaction
// (enqueueDeliveries), so "never queued" is exactly last_sent_at unset, or older than act_now_at for
// an escalation. Only those older than `graceMs` (the raising process may still be retrying) and
// newer than `withinMs` (a day-old push is news to nobody).
export async function listUnnotifiedAlerts(graceMs: number, withinMs: number, now = new Date()) {
  const at = now.toISOString();
  const r = await db().execute(sql`
    select a.id, case when a.last_sent_at is null then 'raised' else 'escalated' end as reason
    from alerts a
    where a.state <> 'settled'
      and (
        (a.last_sent_at is null
          and a.raised_at <= ${at}::timestamptz - make_interval(secs => ${graceMs / 1000}::float8)
          and a.raised_at > ${at}::timestamptz - make_interval(secs => ${withinMs / 1000}::float8))
        or (a.act_now_at > a.raised_at and a.last_sent_at < a.act_now_at
          and a.act_now_at <= ${at}::timestamptz - make_interval(secs => ${graceMs / 1000}::float8)
          and a.act_now_at > ${at}::timestamptz - make_interval(secs => ${withinMs / 1000}::float8))
      )
    order by a.raised_at`);
  // A raise never queued is sent as a raise at the alert's present level, escalated or not.
  return r.rows as { id: string; reason: "raised" | "escalated" }[];
}

// Act-now alerts nobody has claimed, due a reminder: the first `afterMs` after the alert went act
// now, each next one twice as long after the last (15, 30, 60 min), at most `maxReminders` in all
// (common practice: a crew that has not answered three reminders is not helped by a fourth).
// Each is taken with a compare-and-set on reminder_count, so two ingest nodes never both send one.
export async function takeDueReminders(afterMs: number, now = new Date(), maxReminders = 3) {
  const at = now.toISOString();
  return db()
    .update(alerts)
    .set({ remindedAt: now, reminderCount: sql`${alerts.reminderCount} + 1` })
    .where(
      and(
        eq(alerts.state, "raised"),
        eq(alerts.level, "act_now"),
        sql`${alerts.reminderCount} < ${maxReminders}`,
        sql`coalesce(${alerts.remindedAt}, ${alerts.actNowAt}) <= ${at}::timestamptz - make_interval(secs => ${afterMs / 1000}::float8 * power(2, ${alerts.reminderCount}))`,
      ),
    )
    .returning();
}

export async function alertContext(alertId: string) {
  const [r] = await db()
    .select({ binName: bins.name, zoneKind: zones.kind, zoneName: zones.name })
    .from(alerts)
    .innerJoin(bins, eq(bins.id, alerts.binId))
    .leftJoin(zones, eq(zones.id, alerts.zoneId))
    .where(eq(alerts.id, alertId));
  return r ?? null;
}

// Heads-ups held back by someone's quiet hours, on alerts still waiting for a person.
export async function listHeldDeliveries() {
  const r = await db().execute(sql`
    select e.id, e.alert_id as "alertId", e.user_id as "userId"
    from alert_events e join alerts a on a.id = e.alert_id
    where e.type = 'held' and a.state = 'raised' and e.user_id is not null`);
  return r.rows as { id: number; alertId: string; userId: string }[];
}

// Takes a held delivery for sending (compare-and-set on the event row: one node sends it).
export async function takeHeldDelivery(eventId: number, at: Date) {
  const rows = await db()
    .update(alertEvents)
    .set({ type: "released", detail: sql`${alertEvents.detail} || ${JSON.stringify({ releasedAt: at.toISOString() })}::jsonb` })
    .where(and(eq(alertEvents.id, eventId), eq(alertEvents.type, "held")))
    .returning({ id: alertEvents.id });
  return rows.length === 1;
}

export async function getAlertRow(id: string) {
  const [a] = await db().select().from(alerts).where(eq(alerts.id, id));
  return a ?? null;
}
