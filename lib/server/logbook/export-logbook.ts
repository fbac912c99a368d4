import { listFarmZones, listLogEntries, type LogbookEntry } from "@/db/queries/logbook";
import { toCsv, zonedIso, fileSafe, type Cell } from "@/lib/domain/csv-export";
import { AppError } from "@/lib/domain/errors";
import { LOGBOOK_EXPORT_CAP } from "@/lib/domain/export-limits";
import { checkMix } from "@/lib/domain/mix";
import { massForDisplay, UNIT_LABELS, volumeForDisplay, type UnitSystem } from "@/lib/domain/units";
import type { LogbookExportQuery } from "@/lib/domain/validation/logbook-filters";
import { zoneName } from "@/lib/domain/zone-words";
import type { Who } from "@/lib/server/auth/authorize";
import { farmSettings, logbookFilter } from "./farm-logbook";

const KIND_WORDS: Record<LogbookEntry["kind"], string> = {
  feeding: "feeding",
  watering: "watering",
  shift: "shift",
  harvest: "harvest",
  note: "note",
  sample: "oven-dry sample",
};

const r3 = (x: number) => Number(x.toFixed(3));

function mixWords(e: LogbookEntry): string {
  if (!e.items?.length) return "";
  const mix = checkMix(
    e.items.map((i) => ({ massKg: i.massKg, moisturePct: i.moisturePct, carbonPct: i.carbonPct ?? undefined, nitrogenPct: i.nitrogenPct ?? undefined })),
  );
  if (!mix.ok) return "no verdict";
  return mix.value.issues.length ? mix.value.issues.join("; ") : "balanced";
}

/** The farm's logbook, with the page's filters, as one CSV file (RFC 4180) in the farm's units and
 * time zone, every cell guarded against spreadsheet formulas (lib/domain/csv-export.ts). */
export async function exportLogbook(who: Pick<Who, "farmId">, q: LogbookExportQuery) {
  const farm = await farmSettings(who.farmId);
  const [entries, zones] = await Promise.all([listLogEntries(logbookFilter(who.farmId, q, farm.timezone, LOGBOOK_EXPORT_CAP + 1)), listFarmZones(who.farmId)]);
  if (entries.length > LOGBOOK_EXPORT_CAP)
    throw new AppError("invalid", `More than ${LOGBOOK_EXPORT_CAP.toLocaleString("en-GB")} entries match; choose a shorter date range or a bin.`, "from");
  const zoneOf = new Map(zones.map((z) => [z.id, zoneName(z)]));
  const u = UNIT_LABELS[farm.unitSystem];
  const sys: UnitSystem = farm.unitSystem;
  const header = [
    `time (${farm.timezone}, ISO 8601 with offset)`,
    "kind",
    "bin",
    "zone",
    "to zone",
    "by",
    `volume (${u.volume})`,
    `mass (${u.mass})`,
    "moisture (% wet basis)",
    "C:N",
    "mix check",
    `items (${u.mass} each)`,
    "note",
    "notes",
    "entry id",
  ];
  const rows: Cell[][] = entries.map((e) => {
    const volume = e.kind === "watering" ? e.litres : e.kind === "shift" ? e.volumeL : null;
    const moisture = e.kind === "feeding" ? e.mixMoisturePct : e.kind === "sample" ? e.moistureWbPct : null;
    return [
      zonedIso(e.at, farm.timezone),
      KIND_WORDS[e.kind],
      e.binName,
      e.zoneId ? (zoneOf.get(e.zoneId) ?? "") : "whole bin",
      e.toZoneId ? (zoneOf.get(e.toZoneId) ?? "") : "",
      e.byName ?? "",
      volume == null ? null : r3(volumeForDisplay(volume, sys)),
      e.massKg == null ? null : r3(massForDisplay(e.massKg, sys)),
      moisture == null ? null : Number(moisture.toFixed(1)),
      e.mixCn == null ? null : Number(e.mixCn.toFixed(1)),
      e.kind === "feeding" ? mixWords(e) : "",
      (e.items ?? []).map((i) => `${i.name} ${r3(massForDisplay(i.massKg, sys))}`).join("; "),
      e.text ?? "",
      e.notes ?? "",
      e.id,
    ];
  });
  const name = [fileSafe(farm.name), "logbook", q.from, q.to].filter(Boolean).join("-");
  return { body: toCsv(header, rows), fileName: `${name}.csv`, rows: rows.length };
}
