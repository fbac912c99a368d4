import type { SeriesAnswer, SeriesProbe } from "@/db/queries/series";
import { METRICS } from "@/lib/domain/metrics";
import type { SeriesQuery } from "@/lib/domain/validation/series";
import { columnsOf, pointsOf } from "./read-series";

/** One metric of these probes for a chart, one line per probe even when it has no points. */
export async function seriesOf(
  refs: readonly SeriesProbe[],
  q: SeriesQuery,
  opts: { timezone: string; events?: SeriesAnswer["events"] } = { timezone: "UTC" },
): Promise<SeriesAnswer> {
  const got = await pointsOf(
    refs.map((p) => p.id),
    q,
    { by: "probe", timezone: opts.timezone },
  );
  const cols = columnsOf(got.rows);
  const spec = METRICS[q.metric];
  return {
    metric: q.metric,
    unit: spec.unit,
    displayUnit: spec.displayUnit,
    from: q.from.toISOString(),
    to: q.to.toISOString(),
    source: got.source,
    bucketSeconds: got.bucketSeconds,
    series: refs.map((p) => ({ probeId: p.id, code: p.code, label: p.label, ...(cols.get(String(p.id)) ?? { t: [], mean: [], min: [], max: [] }) })),
    ...(opts.events ? { events: opts.events } : {}),
  };
}
