import { getZoneSeriesPlace, listChartEvents, listZoneSeriesProbes } from "@/db/queries/series";
import { AppError } from "@/lib/domain/errors";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import type { SeriesQuery } from "@/lib/domain/validation/series";
import { seriesOf } from "./probe-lines";

/** One metric of every probe placed in the zone (archived ones only if they were there in range),
 * with the logbook entries of the range that concern the zone as marks. */
export async function getZoneSeries(zoneId: string, q: SeriesQuery) {
  const place = await getZoneSeriesPlace(zoneId);
  if (!place) throw new AppError("not_found", "Not found.");
  const [probes, events] = await Promise.all([listZoneSeriesProbes(zoneId, q.from), listChartEvents({ binId: place.binId, zoneId, from: q.from, to: q.to })]);
  return seriesOf(probes, q, { timezone: timeZoneOrUtc(place.timezone), events });
}
