import { sql } from "drizzle-orm";
import { db } from "@/db";
import type { Executor } from "@/db/queries/readings";

// The deferred refresh of reading_daily_rollups from the hourly rollups (never in the ingest
// writer's path). Each probe's days are cut at its farm's midnight; reading_daily_state says in
// which time zone and through which day they are done, and a chart reads the hourly rollups for
// everything after that (db/queries/series.ts, dailyPointsSql).

/** Late readings (a probe's buffer sent after an outage) are caught by redoing this many days
 * before the last refresh every time (common practice: a window a little longer than the longest
 * outage a probe buffers through). An import of older records calls markDailyRollupsStale. */
export const LATE_DAYS = 2;

export type DailyRefresh = { probesReset: number; daysWritten: number };

/**
 * Brings the daily rollups up to the last farm midnight before `now`.
 * `zones` maps each farm time zone as stored to the one to cut days in (an unusable stored zone
 * to "UTC", as the charts do); a probe whose farm's zone changed starts its days again.
 */
export async function refreshDailyRollups(zones: { stored: string[]; effective: string[] }, now = new Date()): Promise<DailyRefresh> {
  return db().transaction(async (tx) => {
    // Two ingest nodes: one refreshes, the other skips this round.
    const lock = await tx.execute<{ ok: boolean }>(sql`select pg_try_advisory_xact_lock(hashtext('wormward_daily_rollups')) as ok`);
    if (!lock.rows[0]?.ok) return { probesReset: 0, daysWritten: 0 };
    const reset = await tx.execute<{ n: number }>(sql`
      with tz as (
        select * from unnest(${sql.param(zones.stored)}::text[], ${sql.param(zones.effective)}::text[]) as z(stored, effective)
      ), cur as (
        select p.id as probe_id, tz.effective as timezone
        from probes p join farms f on f.id = p.farm_id join tz on tz.stored = f.timezone
      ), changed as (
        select cur.* from cur left join reading_daily_state s using (probe_id)
        where s.probe_id is null or s.timezone <> cur.timezone
      ), cleared as (
        delete from reading_daily_rollups d using changed c where d.probe_id = c.probe_id
      ), upserted as (
        insert into reading_daily_state (probe_id, timezone, done_through)
        select probe_id, timezone, '-infinity' from changed
        on conflict (probe_id) do update set timezone = excluded.timezone, done_through = excluded.done_through
        returning 1
      )
      select count(*)::int as n from upserted`);
    const written = await tx.execute<{ n: number }>(sql`
      with st as (
        select s.probe_id, s.timezone,
               ((s.done_through at time zone s.timezone) - make_interval(days => ${LATE_DAYS})) at time zone s.timezone as redo_from,
               date_trunc('day', ${now.toISOString()}::timestamptz, s.timezone) as today
        from reading_daily_state s
      ), days as (
        select h.probe_id, h.metric, date_trunc('day', h.hour, st.timezone) as day,
               min(h.min) as min, max(h.max) as max, sum(h.sum) as sum, sum(h.count)::int as count
        from st join reading_rollups h on h.probe_id = st.probe_id and h.hour >= st.redo_from and h.hour < st.today
        group by 1, 2, 3
      ), up as (
        insert into reading_daily_rollups as d (probe_id, metric, day, min, max, sum, count)
        select * from days
        on conflict (probe_id, metric, day) do update set min = excluded.min, max = excluded.max, sum = excluded.sum, count = excluded.count
        where (d.min, d.max, d.sum, d.count) is distinct from (excluded.min, excluded.max, excluded.sum, excluded.count)
        returning 1
      ), moved as (
        update reading_daily_state s set done_through = st.today from st
        where s.probe_id = st.probe_id and s.done_through <> st.today
      )
      select count(*)::int as n from up`);
    return { probesReset: reset.rows[0]?.n ?? 0, daysWritten: written.rows[0]?.n ?? 0 };
  });
}

/** Readings older than the last refresh arrived (an import): the probes' days from `since` are
 * redone at the next refresh, and charts read those days from the hourly rollups until then. */
export async function markDailyRollupsStale(probeIds: number[], since: Date, ex: Executor = db()): Promise<void> {
  if (probeIds.length === 0) return;
  await ex.execute(sql`
    update reading_daily_state set done_through = least(done_through, date_trunc('day', ${since.toISOString()}::timestamptz, timezone))
    where probe_id = any(${sql.param(probeIds)}::int[])`);
}

/** The farm time zones as stored (the refresh maps each to the zone it cuts days in). */
export async function listFarmTimezones(): Promise<string[]> {
  const r = await db().execute<{ timezone: string }>(sql`select distinct timezone from farms`);
  return r.rows.map((x) => x.timezone);
}
