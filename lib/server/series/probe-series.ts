import { getSeriesProbe } from "@/db/queries/series";
import { AppError } from "@/lib/domain/errors";
import type { SeriesQuery } from "@/lib/domain/validation/series";
import { seriesOf } from "./probe-lines";

/** One metric of one probe for a chart (no logbook marks: a probe may move between zones). */
export async function getProbeSeries(probeId: number, q: SeriesQuery) {
  const probe = await getSeriesProbe(probeId);
  if (!probe) throw new AppError("not_found", "Not found.");
  return seriesOf([probe], q);
}
