import {
  listBucketedReadingPoints,
  listDailyPoints,
  listProbeLinePoints,
  listRollupPoints,
  type LineKey,
  type SeriesLevel,
  type SeriesPoint,
  type SeriesRange,
} from "@/db/queries/series";
import { METRICS } from "@/lib/domain/metrics";

/** About this many points per series at most from raw readings. */
export const MAX_POINTS = 1000;
const HOUR_S = 3600;
const DAY_MS = 86_400_000;
// Bucket widths a chart reads easily; the smallest that keeps raw readings within MAX_POINTS is used.
const STEPS_S = [60, 120, 300, 600, 900, 1800, 3600];

/** How a range is read, by its length: raw readings for a few days (a phone's 24 h shows every
 * reading), then the hourly rollups merged into wider buckets, so a series has a few hundred points
 * at most (7 d: 168 hours; 30 d: 120 quarters of a day; 1 y: 365 days) whatever the table holds. */
export const LEVELS: readonly { upToMs: number; source: "raw" | "rollup"; bucketSeconds: number | null }[] = [
  { upToMs: 3 * DAY_MS, source: "raw", bucketSeconds: null },
  { upToMs: 14 * DAY_MS, source: "rollup", bucketSeconds: HOUR_S },
  { upToMs: 90 * DAY_MS, source: "rollup", bucketSeconds: 6 * HOUR_S },
  { upToMs: Infinity, source: "rollup", bucketSeconds: 24 * HOUR_S },
];

export function levelFor(rangeMs: number) {
  return LEVELS.find((l) => rangeMs <= l.upToMs)!;
}

export function bucketFor(rangeMs: number, minS = 60): number {
  const need = rangeMs / 1000 / MAX_POINTS;
  return STEPS_S.find((s) => s >= need && s >= minS) ?? STEPS_S.at(-1)!;
}

type Points = SeriesLevel & { rows: SeriesPoint[] };

/** The points of these probes over the range, one line per probe or per zone (`by`), at the
 * range's level. Raw lines by probe are single readings while they fit in MAX_POINTS; lines by
 * zone are always bucketed (at least 5 minutes), so two probes of a zone make one line. Buckets
 * wider than an hour are cut on the farm's wall clock (`timezone`). */
export async function pointsOf(ids: number[], q: SeriesRange, opts: { by: LineKey; timezone: string; minRawBucketS?: number }): Promise<Points> {
  const rangeMs = q.to.getTime() - q.from.getTime();
  const level = levelFor(rangeMs);
  if (ids.length === 0) return { source: level.source, bucketSeconds: level.bucketSeconds, rows: [] };
  if (level.source === "rollup") {
    const b = level.bucketSeconds!;
    // A year in days: the daily rollups (refreshed off the ingest path) and hourly ones for the rest.
    if (b === DAY_MS / 1000) return { ...level, rows: await listDailyPoints(ids, q, opts.timezone, opts.by) };
    return { ...level, rows: await listRollupPoints(ids, q, b, { by: opts.by, timezone: b > HOUR_S ? opts.timezone : "UTC" }) };
  }
  const bucket = bucketFor(rangeMs, opts.minRawBucketS);
  if (opts.by === "probe") {
    const got = await listProbeLinePoints(ids, q, MAX_POINTS, bucket);
    return { source: "raw", bucketSeconds: got.bucketed ? bucket : null, rows: got.rows };
  }
  return { source: "raw", bucketSeconds: bucket, rows: await listBucketedReadingPoints(ids, q, bucket, opts.by) };
}

/** Rows into columns per line key: t in Unix seconds, mean, min and max. */
type Columns = { t: number[]; mean: number[]; min: number[]; max: number[] };

/** Each line's points as columns, keyed by probe id or zone id; `of(key)` is an empty line when it has none. */
export function columnsOf(rows: SeriesPoint[]) {
  const out = new Map<string, Columns>();
  for (const row of rows) {
    let c = out.get(row.key);
    if (!c) out.set(row.key, (c = { t: [], mean: [], min: [], max: [] }));
    c.t.push(new Date(row.t).getTime() / 1000);
    c.mean.push(Number(row.mean));
    c.min.push(Number(row.min));
    c.max.push(Number(row.max));
  }
  return { of: (key: string): Columns => out.get(key) ?? { t: [], mean: [], min: [], max: [] } };
}

/** What every series answer starts with: the metric, its units, the range and where the points came from. */
export function answerHead<M extends keyof typeof METRICS>(q: { metric: M; from: Date; to: Date }, got: Pick<Points, "source" | "bucketSeconds">) {
  const spec = METRICS[q.metric];
  return {
    metric: q.metric,
    unit: spec.unit,
    displayUnit: spec.displayUnit,
    from: q.from.toISOString(),
    to: q.to.toISOString(),
    source: got.source,
    bucketSeconds: got.bucketSeconds,
  };
}
