import { listReadingsForExport } from "@/db/queries/readings-export";
import { getFarm } from "@/db/queries/farms";
import { farmOfTarget } from "@/db/queries/access";
import { toCsv, zonedIso, fileSafe, type Cell } from "@/lib/domain/csv-export";
import { AppError } from "@/lib/domain/errors";
import { READINGS_EXPORT_CAP } from "@/lib/domain/export-limits";
import { METRICS } from "@/lib/domain/metrics";
import { readingsToSenml } from "@/lib/domain/senml-export";
import { temperatureForDisplay, UNIT_LABELS } from "@/lib/domain/units";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import { EXPORT_METRICS, type ReadingsExportQuery } from "@/lib/domain/validation/logbook-filters";
import type { Metric } from "@/lib/domain/vocabulary";
import { zoneName } from "@/lib/domain/zone-words";
import type { Who } from "@/lib/server/auth/authorize";
import { farmDayRange } from "@/lib/server/logbook/day-range";

/** A zone's or a bin's readings over farm-local days, as CSV in the farm's units and time zone, or
 * as SenML JSON (RFC 8428, SI units and Unix times as SenML has them). Another farm's zone or bin
 * answers 404, as if it did not exist. */
export async function exportReadings(who: Pick<Who, "farmId">, q: ReadingsExportQuery) {
  const place = q.zoneId ? { zoneId: q.zoneId } : { binId: q.binId! };
  const [owner, farm] = await Promise.all([farmOfTarget(place), getFarm(who.farmId)]);
  if (owner !== who.farmId || !farm) throw new AppError("not_found", "Not found.");
  const timezone = timeZoneOrUtc(farm.timezone);
  const range = farmDayRange(q.from, q.to, timezone) as { from: Date; to: Date };
  const metrics: readonly Metric[] = q.metric ?? EXPORT_METRICS;
  const rows = await listReadingsForExport(who.farmId, place, { metrics, ...range, limit: READINGS_EXPORT_CAP + 1 });
  if (rows.length > READINGS_EXPORT_CAP)
    throw new AppError("invalid", `More than ${READINGS_EXPORT_CAP.toLocaleString("en-GB")} readings in that range; choose fewer days or metrics.`, "from");
  const name = `${fileSafe(farm.name)}-readings-${q.from}-${q.to}`;

  if (q.format === "senml") {
    // RFC 8428 §11: a pack holds at least one record, so an empty range is said, not sent as [].
    if (rows.length === 0) throw new AppError("invalid", "No readings in that range; choose other days, metrics or a zone with a probe.", "from");
    return { body: JSON.stringify(readingsToSenml(rows)), fileName: `${name}.senml.json`, contentType: "application/senml+json", rows: rows.length };
  }
  const u = UNIT_LABELS[farm.unitSystem];
  const header = [`time (${timezone}, ISO 8601 with offset)`, "bin", "zone", "probe", "metric", "value", "unit"];
  const body: Cell[][] = rows.map((r) => {
    const spec = METRICS[r.metric];
    const temperature = r.metric === "temperature";
    return [
      zonedIso(r.ts, timezone),
      r.binName,
      zoneName({ kind: r.zoneKind, name: r.zoneName }),
      r.probeLabel ? `${r.probeLabel} (${r.probeCode})` : r.probeCode,
      spec.label,
      temperature ? Number(temperatureForDisplay(r.value, farm.unitSystem).toFixed(2)) : r.value,
      temperature ? u.temperature : spec.displayUnit || "count",
    ];
  });
  return { body: toCsv(header, body), fileName: `${name}.csv`, contentType: "text/csv; charset=utf-8", rows: rows.length };
}
