import { sql } from "drizzle-orm";
import { db, type Db } from "@/db";
import { rejectedMessages, type Metric } from "@/db/schema";

/** The pool-wide instance or an open transaction: the ingest writer runs these inside one. */
export type Executor = Db | Parameters<Parameters<Db["transaction"]>[0]>[0];

export type ReadingInput = { probeId: number; metric: Metric; ts: Date; value: number };

export type RejectionInput = {
  farmId?: string | null;
  probeId?: number | null;
  source: "mqtt" | "http" | "csv";
  topic?: string | null;
  reason: string;
  excerpt?: string | null;
};

const byKey = (a: ReadingInput, b: ReadingInput) =>
  a.probeId - b.probeId || (a.metric < b.metric ? -1 : a.metric > b.metric ? 1 : 0) || a.ts.getTime() - b.ts.getTime();

/**
 * Stores readings in one statement; a reading already stored (same probe, metric, time) is a no-op.
 * The hourly rollups are merged from the rows this statement actually inserted (its RETURNING), so a
 * resent reading never counts twice, and both change in the same statement, hence the same
 * transaction. Returns how many rows were new.
 */
export async function insertReadings(rows: readonly ReadingInput[], ex: Executor = db()): Promise<{ inserted: number }> {
  if (rows.length === 0) return { inserted: 0 };
  // Key order, so concurrent writers take row locks in the same order and cannot deadlock.
  const sorted = [...rows].sort(byKey);
  // unnest() turns four arrays into rows: one statement and four parameters for any batch size.
  // date_trunc with 'UTC' so hour buckets do not depend on the session's TimeZone.
  const r = await ex.execute<{ inserted: number }>(sql`
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
    select count(*)::int as inserted from ins`);
  return { inserted: r.rows[0]?.inserted ?? 0 };
}

// PostgreSQL text cannot hold U+0000; a rejected payload may well contain one.
const clean = (s: string | null | undefined) => (s == null ? null : s.replace(/\u0000/g, "\uFFFD"));

/** Records why messages or rows were refused, with the first bytes of what arrived. */
export async function recordRejections(rows: readonly RejectionInput[], ex: Executor = db()): Promise<void> {
  if (rows.length === 0) return;
  await ex.insert(rejectedMessages).values(
    rows.map((r) => ({
      farmId: r.farmId ?? null,
      probeId: r.probeId ?? null,
      source: r.source,
      topic: clean(r.topic),
      reason: clean(r.reason) ?? "",
      excerpt: clean(r.excerpt),
    })),
  );
}
