import { sql } from "drizzle-orm";
import { db, type Db } from "@/db";
import { rejectedMessages, type Metric } from "@/db/schema";

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
  // Key order: concurrent writers lock rows in the same order, so they cannot deadlock.
  const sorted = [...rows].sort(byKey);
  // unnest: one statement, four parameters for any batch; 'UTC' so hours ignore the session TimeZone.
  const r = await ex.execute<{ inserted: number; probe_ids: number[] | null }>(sql`
    with ins as (
      insert into readings (probe_id, metric, ts, value)
      select * from unnest(
        ${sql.param(sorted.map((x) => x.probeId))}::int[],
        ${sql.param(sorted.map((x) => x.metric))}::metric[],
        ${sql.param(sorted.map((x) => x.ts.toISOString()))}::timestamptz[],
        ${sql.param(sorted.map((x) => x.value))}::float8[])
      on conflict do nothing
      returning probe_id, metric, ts, value
    ), rolled as (
      insert into reading_rollups as r (probe_id, metric, hour, min, max, sum, count)
      select probe_id, metric, date_trunc('hour', ts, 'UTC'), min(value), max(value), sum(value), count(*)::int
      from ins group by 1, 2, 3 order by 1, 2, 3
      on conflict (probe_id, metric, hour) do update set
        min = least(r.min, excluded.min),
        max = greatest(r.max, excluded.max),
        sum = r.sum + excluded.sum,
        count = r.count + excluded.count
    )
    select count(*)::int as inserted, array_agg(distinct probe_id) as probe_ids from ins`);
  const inserted = r.rows[0]?.inserted ?? 0;
  const probeIds = r.rows[0]?.probe_ids ?? [];
  // Tell every rule runner (any ingest node) which probes have new readings, whichever door they
  // came in by (MQTT, HTTP, CSV). NOTIFY inside a transaction is delivered at its commit.
  if (inserted > 0) await ex.execute(sql`select pg_notify(${READINGS_CHANNEL}, ${JSON.stringify(probeIds.length > 500 ? "*" : probeIds)})`);
  return { inserted, probeIds };
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
