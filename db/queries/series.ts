import { and, asc, eq, gt, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { probes, type Metric } from "@/db/schema";

// The reads behind a chart's series; lib/server/series chooses among them and shapes the answer.

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

export type SeriesProbe = { id: number; code: string; label: string | null };
export type SeriesRange = { metric: Metric; from: Date; to: Date };
/** One point of one probe: a reading (mean = min = max) or a bucket of them. */
export type SeriesPoint = { probe_id: number; t: Date; mean: number; min: number; max: number };

const ref = { id: probes.id, code: probes.code, label: probes.label };

/** Every probe placed in the zone, archived ones only if they were still in use after `since`. */
export async function listZoneSeriesProbes(zoneId: string, since: Date): Promise<SeriesProbe[]> {
  return db()
    .select(ref)
    .from(probes)
    .where(and(eq(probes.zoneId, zoneId), or(isNull(probes.archivedAt), gt(probes.archivedAt, since))))
    .orderBy(asc(probes.code));
}

export async function getSeriesProbe(probeId: number): Promise<SeriesProbe | null> {
  const [p] = await db().select(ref).from(probes).where(eq(probes.id, probeId));
  return p ?? null;
}

const inRange = (ids: number[], r: SeriesRange) =>
  sql`probe_id = any(${sql.param(ids)}::int[]) and metric = ${r.metric} and ts >= ${r.from.toISOString()} and ts < ${r.to.toISOString()}`;

/** The most readings any one of these probes has in the range. */
export async function maxReadingCount(ids: number[], r: SeriesRange): Promise<number> {
  const counted = await db().execute<{ n: number }>(sql`
    select count(*)::int as n from readings where ${inRange(ids, r)}
    group by probe_id order by n desc limit 1`);
  return counted.rows[0]?.n ?? 0;
}

/** Each reading in the range as a point of its own. */
export async function listReadingPoints(ids: number[], r: SeriesRange): Promise<SeriesPoint[]> {
  const got = await db().execute<SeriesPoint>(sql`
    select probe_id, ts as t, value as mean, value as min, value as max from readings
    where ${inRange(ids, r)}
    order by probe_id, ts`);
  return got.rows;
}

// date_bin (PostgreSQL 14+) has no Drizzle word; buckets align to a fixed origin so a chart that
// slides its window keeps the same bucket edges.
const ORIGIN = sql`timestamptz '2000-01-01 00:00:00+00'`;

/** The readings in the range merged into buckets of `bucketS` seconds. */
export async function listBucketedReadingPoints(ids: number[], r: SeriesRange, bucketS: number): Promise<SeriesPoint[]> {
  const got = await db().execute<SeriesPoint>(sql`
    select probe_id, date_bin(make_interval(secs => ${bucketS}), ts, ${ORIGIN}) as t,
           avg(value) as mean, min(value) as min, max(value) as max
    from readings
    where ${inRange(ids, r)}
    group by 1, 2 order by 1, 2`);
  return got.rows;
}

/** The hourly rollups that overlap the range merged into buckets of `bucketS` seconds (a whole number of hours). */
export async function listRollupPoints(ids: number[], r: SeriesRange, bucketS: number): Promise<SeriesPoint[]> {
  // The mean of merged hours weighs each hour by its reading count.
  const got = await db().execute<SeriesPoint>(sql`
    select probe_id, date_bin(make_interval(secs => ${bucketS}), hour, ${ORIGIN}) as t,
           sum(sum) / sum(count) as mean, min(min) as min, max(max) as max
    from reading_rollups
    where probe_id = any(${sql.param(ids)}::int[]) and metric = ${r.metric}
      and hour >= date_trunc('hour', ${r.from.toISOString()}::timestamptz, 'UTC') and hour < ${r.to.toISOString()}
    group by 1, 2 order by 1, 2`);
  return got.rows;
}
