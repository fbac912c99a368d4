import { getBinSeriesPlace, listBinSeriesProbeIds, listChartEvents, type BinSeriesAnswer } from "@/db/queries/series";
import { AppError } from "@/lib/domain/errors";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import type { SeriesQuery } from "@/lib/domain/validation/series";
import { answerHead, columnsOf, pointsOf } from "./read-series";

// Raw readings of a bin's zones are merged into buckets of at least 5 minutes: two probes of one
// zone then make one line, and the comparison stays light (common practice, our choice).
const MIN_RAW_BUCKET_S = 300;

/** One metric of every zone of a bin, one line per zone (its probes merged, an empty line when it
 * has none), with all the bin's logbook entries of the range as marks and the bin's species, so the
 * chart can shade its band. */
export async function getBinSeries(binId: string, q: SeriesQuery): Promise<BinSeriesAnswer> {
  const place = await getBinSeriesPlace(binId);
  if (!place) throw new AppError("not_found", "Not found.");
  const [ids, events] = await Promise.all([listBinSeriesProbeIds(binId, q.from), listChartEvents({ binId, from: q.from, to: q.to })]);
  const got = await pointsOf(ids, q, { by: "zone", timezone: timeZoneOrUtc(place.timezone), minRawBucketS: MIN_RAW_BUCKET_S });
  const cols = columnsOf(got.rows);
  return {
    ...answerHead(q, got),
    species: place.species,
    zones: place.zones.map((z) => ({ zoneId: z.id, kind: z.kind, name: z.name, ...cols.of(z.id) })),
    events,
  };
}
