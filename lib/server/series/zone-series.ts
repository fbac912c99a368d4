import { listZoneSeriesProbes } from "@/db/queries/series";
import type { SeriesQuery } from "@/lib/domain/validation/series";
import { seriesOf } from "./read-series";

/** One metric of every probe placed in the zone (archived ones only if they were there in range). */
export async function getZoneSeries(zoneId: string, q: SeriesQuery) {
  return seriesOf(await listZoneSeriesProbes(zoneId, q.from), q);
}
