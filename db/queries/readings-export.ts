import { and, asc, eq, gte, inArray, lt } from "drizzle-orm";
import { db } from "@/db";
import { bins, probes, readings, zones, type Metric } from "@/db/schema";

/** The readings of the probes now placed in a zone (or in any zone of a bin) of this farm, for some
 * metrics in [from, to), oldest first; at most `limit` rows (the caller asks one more than it will
 * write, to know when a range is too large). A zone's readings are its probes' readings, as the
 * charts read them (db/queries/series.ts). */
export async function listReadingsForExport(
  farmId: string,
  place: { zoneId: string } | { binId: string },
  r: { metrics: readonly Metric[]; from: Date; to: Date; limit: number },
) {
  return db()
    .select({
      ts: readings.ts,
      value: readings.value,
      metric: readings.metric,
      probeCode: probes.code,
      probeLabel: probes.label,
      binName: bins.name,
      zoneKind: zones.kind,
      zoneName: zones.name,
    })
    .from(readings)
    .innerJoin(probes, eq(probes.id, readings.probeId))
    .innerJoin(zones, eq(zones.id, probes.zoneId))
    .innerJoin(bins, eq(bins.id, zones.binId))
    .where(
      and(
        eq(bins.farmId, farmId),
        "zoneId" in place ? eq(zones.id, place.zoneId) : eq(bins.id, place.binId),
        inArray(readings.metric, [...r.metrics]),
        gte(readings.ts, r.from),
        lt(readings.ts, r.to),
      ),
    )
    .orderBy(asc(readings.ts), asc(zones.position), asc(probes.code), asc(readings.metric))
    .limit(r.limit);
}
export type ExportReading = Awaited<ReturnType<typeof listReadingsForExport>>[number];
