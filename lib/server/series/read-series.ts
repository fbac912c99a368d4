import {
  listBucketedReadingPoints,
  listReadingPoints,
  listRollupPoints,
  maxReadingCount,
  type SeriesAnswer,
  type SeriesLine,
  type SeriesPoint,
  type SeriesProbe,
} from "@/db/queries/series";
import { METRICS } from "@/lib/domain/metrics";
import type { SeriesQuery } from "@/lib/domain/validation/series";

/** About this many points per series at most, whatever the range. */
export const MAX_POINTS = 1000;
/** Ranges longer than this are answered from hourly rollups instead of raw readings. */
export const RAW_MAX_MS = 7 * 86_400_000;
const HOUR_S = 3600;
// Bucket widths a chart reads easily; the smallest that keeps a series within MAX_POINTS is used.
const STEPS_S = [60, 120, 300, 600, 900, 1800, 3600, 7200, 10800, 21600, 43200, 86400, 172800, 604800];

export function bucketFor(rangeMs: number, minS = 60): number {
  const need = rangeMs / 1000 / MAX_POINTS;
  return STEPS_S.find((s) => s >= need && s >= minS) ?? STEPS_S.at(-1)!;
}

type Points = { rows: SeriesPoint[]; bucketSeconds: number | null };

async function pointsOf(ids: number[], q: SeriesQuery, long: boolean): Promise<Points> {
  if (ids.length === 0) return { rows: [], bucketSeconds: null };
  const rangeMs = q.to.getTime() - q.from.getTime();
  if (long) {
    const bucket = bucketFor(rangeMs, HOUR_S);
    return { rows: await listRollupPoints(ids, q, bucket), bucketSeconds: bucket };
  }
  if ((await maxReadingCount(ids, q)) <= MAX_POINTS) return { rows: await listReadingPoints(ids, q), bucketSeconds: null };
  const bucket = bucketFor(rangeMs);
  return { rows: await listBucketedReadingPoints(ids, q, bucket), bucketSeconds: bucket };
}

/** One metric of these probes for a chart: raw readings for a short range (bucketed past
 * MAX_POINTS), hourly rollups for a long one, one line per probe even when it has no points. */
export async function seriesOf(refs: readonly SeriesProbe[], q: SeriesQuery): Promise<SeriesAnswer> {
  const long = q.to.getTime() - q.from.getTime() > RAW_MAX_MS;
  const ids = refs.map((p) => p.id);
  const got = await pointsOf(ids, q, long);
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
