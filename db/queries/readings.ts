import { sql } from "drizzle-orm";
import { db, type Db } from "@/db";
import { rejectedMessages, type Metric } from "@/db/schema";
import { probeStatusUpdateSql, type ProbeStatusUpdate } from "./probes";

export type Executor = Db | Parameters<Parameters<Db["transaction"]>[0]>[0];

export type ReadingInput = { probeId: number; metric: Metric; ts: Date; value: number };

export type RejectionInput = {
  farmId?: string | null;
  probeId?: number | null;
  source: "mqtt" | "http" | "csv";
  topic?: string | null;
  reason: string;
  /** How many records of the message this row stands for (its reason holds the first few). */
  records?: number;
  excerpt?: string | null;
};

const byKey = (a: ReadingInput, b: ReadingInput) =>
  a.probeId - b.probeId || (a.metric < b.metric ? -1 : a.metric > b.metric ? 1 : 0) || a.ts.getTime() - b.ts.getTime();

// Rollups merge only the rows this statement inserted (RETURNING), so a resent reading never counts twice.
export async function insertReadings(rows: readonly ReadingInput[], ex: Executor = db()): Promise<{ inserted: number; probeIds: number[] }> {
  if (rows.length === 0) return { inserted: 0, probeIds: [] };
  return storeBatch({ readings: rows }, ex);
}

export type Batch = { readings: readonly ReadingInput[]; rejections?: readonly RejectionInput[]; statuses?: readonly ProbeStatusUpdate[] };

/**
 * Stores readings (as insertReadings does: duplicates ignored, hourly rollups merged once per batch,
 * a NOTIFY on wormward_readings when any is new), refusals and probe status updates in ONE statement:
 * atomic on its own, so the ingest writer needs no BEGIN and COMMIT, one round trip a batch.
 */
export async function storeBatch(batch: Batch, ex: Executor = db()): Promise<{ inserted: number; probeIds: number[] }> {
  const rejections = batch.rejections ?? [];
  const status = probeStatusUpdateSql(batch.statuses ?? []);
  if (batch.readings.length === 0 && rejections.length === 0 && !status) return { inserted: 0, probeIds: [] };
  // Key order: concurrent writers lock rows in the same order, so they cannot deadlock.
  const sorted = [...batch.readings].sort(byKey);
  const n = sorted.length;
  const ids = new Array<number>(n);
  const metrics = new Array<string>(n);
  const times = new Array<string>(n);
  const values = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    const r = sorted[i]!;
    ids[i] = r.probeId;
    metrics[i] = r.metric;
    times[i] = r.ts.toISOString();
    values[i] = r.value;
  }
  const parts = [
    // unnest: one statement, four parameters for any batch; 'UTC' so hours ignore the session TimeZone.
    sql`ins as (
      insert into readings (probe_id, metric, ts, value)
      select * from unnest(${sql.param(ids)}::int[], ${sql.param(metrics)}::metric[], ${sql.param(times)}::timestamptz[], ${sql.param(values)}::float8[])
      on conflict do nothing
      returning probe_id, metric, ts, value
    )`,
    sql`rolled as (
      insert into reading_rollups as r (probe_id, metric, hour, min, max, sum, count)
      select probe_id, metric, date_trunc('hour', ts, 'UTC'), min(value), max(value), sum(value), count(*)::int
      from ins group by 1, 2, 3 order by 1, 2, 3
      on conflict (probe_id, metric, hour) do update set
        min = least(r.min, excluded.min),
        max = greatest(r.max, excluded.max),
        sum = r.sum + excluded.sum,
        count = r.count + excluded.count
    )`,
  ];
  if (rejections.length) {
    const col = <T>(f: (r: RejectionInput) => T) => sql.param(rejections.map(f));
    parts.push(sql`refused as (
      insert into rejected_messages (farm_id, probe_id, source, topic, reason, records, excerpt)
      select * from unnest(${col((r) => r.farmId ?? null)}::uuid[], ${col((r) => r.probeId ?? null)}::int[], ${col((r) => r.source)}::reject_source[],
        ${col((r) => clean(r.topic))}::text[], ${col((r) => clean(r.reason) ?? "")}::text[], ${col((r) => r.records ?? 1)}::int[], ${col((r) => clean(r.excerpt))}::text[])
    )`);
  }
  if (status) parts.push(sql`seen as (${status})`);
  // Tell every rule runner (any ingest node) which probes have new readings, whichever door they
  // came in by (MQTT, HTTP, CSV). A NOTIFY is delivered at its transaction's commit.
  const r = await ex.execute<{ inserted: number; probe_ids: number[] | null }>(sql`
    with ${sql.join(parts, sql`, `)},
    summary as (select count(*)::int as inserted, array_agg(distinct probe_id) as probe_ids from ins)
    select inserted, probe_ids,
      (select count(*) from (
        select pg_notify(${READINGS_CHANNEL}, case when cardinality(probe_ids) > 500 then '"*"' else array_to_json(probe_ids)::text end)
        from summary where inserted > 0) told) as told
    from summary`);
  return { inserted: r.rows[0]?.inserted ?? 0, probeIds: r.rows[0]?.probe_ids ?? [] };
}

export const READINGS_CHANNEL = "wormward_readings";

// PostgreSQL text cannot hold U+0000; a rejected payload may well contain one.
const clean = (s: string | null | undefined) => (s == null ? null : s.replace(/\u0000/g, "\uFFFD"));

export async function recordRejections(rows: readonly RejectionInput[], ex: Executor = db()): Promise<void> {
  if (rows.length === 0) return;
  await ex.insert(rejectedMessages).values(
    rows.map((r) => ({
      farmId: r.farmId ?? null,
      probeId: r.probeId ?? null,
      source: r.source,
      topic: clean(r.topic),
      reason: clean(r.reason) ?? "",
      records: r.records ?? 1,
      excerpt: clean(r.excerpt),
    })),
  );
}
