import { and, asc, eq, gt, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { probes, type Metric } from "@/db/schema";
import { METRICS } from "@/lib/domain/metrics";
import type { SeriesQuery } from "@/lib/domain/validation/series";

/** About this many points per series at most, whatever the range. */
export const MAX_POINTS = 1000;
/** Ranges longer than this are answered from hourly rollups instead of raw readings. */
export const RAW_MAX_MS = 7 * 86_400_000;
const HOUR_S = 3600;
// Bucket widths a chart reads easily; the smallest that keeps a series within MAX_POINTS is used.
const STEPS_S = [60, 120, 300, 600, 900, 1800, 3600, 7200, 10800, 21600, 43200, 86400, 172800, 604800];

export type SeriesLine = {
  probeId: number;
  code: string;
  label: string | null;
  /** Start of each point (raw: the reading's time) in Unix seconds, ascending. */
  t: number[];
  mean: number[];
  min: number[];
  max: number[];
};

export type SeriesAnswer = {
  metric: Metric;
  unit: string | null;
  displayUnit: string;
  from: string;
  to: string;
  /** raw: readings (bucketed when there are too many); rollup: hourly rollups. */
  source: "raw" | "rollup";
  /** Width of each point; null when points are single raw readings. */
  bucketSeconds: number | null;
  series: SeriesLine[];
};

export function bucketFor(rangeMs: number, minS = 60): number {
  const need = rangeMs / 1000 / MAX_POINTS;
  return STEPS_S.find((s) => s >= need && s >= minS) ?? STEPS_S.at(-1)!;
}

type Row = { probe_id: number; t: Date; mean: number; min: number; max: number };
type ProbeRef = { id: number; code: string; label: string | null };

async function raw(ids: number[], q: SeriesQuery): Promise<{ rows: Row[]; bucketSeconds: number | null }> {
  const d = db();
  const counted = await d.execute<{ n: number }>(sql`
    select count(*)::int as n from readings
    where probe_id = any(${sql.param(ids)}::int[]) and metric = ${q.metric} and ts >= ${q.from.toISOString()} and ts < ${q.to.toISOString()}
    group by probe_id order by n desc limit 1`);
  if ((counted.rows[0]?.n ?? 0) <= MAX_POINTS) {
    const r = await d.execute<Row>(sql`
      select probe_id, ts as t, value as mean, value as min, value as max from readings
      where probe_id = any(${sql.param(ids)}::int[]) and metric = ${q.metric} and ts >= ${q.from.toISOString()} and ts < ${q.to.toISOString()}
      order by probe_id, ts`);
    return { rows: r.rows, bucketSeconds: null };
  }
  const bucket = bucketFor(q.to.getTime() - q.from.getTime());
  // date_bin (PostgreSQL 14+) has no Drizzle word; buckets align to a fixed origin so a chart
  // that slides its window keeps the same bucket edges.
  const r = await d.execute<Row>(sql`
    select probe_id, date_bin(make_interval(secs => ${bucket}), ts, timestamptz '2000-01-01 00:00:00+00') as t,
           avg(value) as mean, min(value) as min, max(value) as max
    from readings
    where probe_id = any(${sql.param(ids)}::int[]) and metric = ${q.metric} and ts >= ${q.from.toISOString()} and ts < ${q.to.toISOString()}
    group by 1, 2 order by 1, 2`);
  return { rows: r.rows, bucketSeconds: bucket };
}

async function rollup(ids: number[], q: SeriesQuery): Promise<{ rows: Row[]; bucketSeconds: number }> {
  const bucket = bucketFor(q.to.getTime() - q.from.getTime(), HOUR_S);
  // Hours that overlap the range; the mean of merged hours weighs each by its reading count.
  const r = await db().execute<Row>(sql`
    select probe_id, date_bin(make_interval(secs => ${bucket}), hour, timestamptz '2000-01-01 00:00:00+00') as t,
           sum(sum) / sum(count) as mean, min(min) as min, max(max) as max
    from reading_rollups
    where probe_id = any(${sql.param(ids)}::int[]) and metric = ${q.metric}
      and hour >= date_trunc('hour', ${q.from.toISOString()}::timestamptz, 'UTC') and hour < ${q.to.toISOString()}
    group by 1, 2 order by 1, 2`);
  return { rows: r.rows, bucketSeconds: bucket };
}

async function answer(refs: ProbeRef[], q: SeriesQuery): Promise<SeriesAnswer> {
  const long = q.to.getTime() - q.from.getTime() > RAW_MAX_MS;
  const ids = refs.map((p) => p.id);
  const got = ids.length === 0 ? { rows: [], bucketSeconds: null } : long ? await rollup(ids, q) : await raw(ids, q);
  const lines = new Map<number, SeriesLine>(refs.map((p) => [p.id, { probeId: p.id, code: p.code, label: p.label, t: [], mean: [], min: [], max: [] }]));
  for (const row of got.rows) {
    const line = lines.get(Number(row.probe_id))!;
    line.t.push(new Date(row.t).getTime() / 1000);
    line.mean.push(Number(row.mean));
    line.min.push(Number(row.min));
    line.max.push(Number(row.max));
  }
  const spec = METRICS[q.metric];
  return {
    metric: q.metric,
    unit: spec.unit,
    displayUnit: spec.displayUnit,
    from: q.from.toISOString(),
    to: q.to.toISOString(),
    source: long ? "rollup" : "raw",
    bucketSeconds: got.bucketSeconds,
    series: [...lines.values()],
  };
}

/** One metric of every probe placed in the zone (archived ones only if they were there in range). */
export async function getZoneSeries(zoneId: string, q: SeriesQuery): Promise<SeriesAnswer> {
  const refs = await db()
    .select({ id: probes.id, code: probes.code, label: probes.label })
    .from(probes)
    .where(and(eq(probes.zoneId, zoneId), or(isNull(probes.archivedAt), gt(probes.archivedAt, q.from))))
    .orderBy(asc(probes.code));
  return answer(refs, q);
}

export async function getProbeSeries(probeId: number, q: SeriesQuery): Promise<SeriesAnswer | null> {
  const [ref] = await db().select({ id: probes.id, code: probes.code, label: probes.label }).from(probes).where(eq(probes.id, probeId));
  return ref ? answer([ref], q) : null;
}
