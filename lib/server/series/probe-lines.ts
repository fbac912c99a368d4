import type { SeriesAnswer, SeriesProbe } from "@/db/queries/series";
import type { SeriesQuery } from "@/lib/domain/validation/series";
import { answerHead, columnsOf, pointsOf } from "./read-series";

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
  return {
    ...answerHead(q, got),
    series: refs.map((p) => ({ probeId: p.id, code: p.code, label: p.label, ...cols.of(String(p.id)) })),
    ...(opts.events ? { events: opts.events } : {}),
  };
}
