// How a zone's three watched metrics are banded and said, shared by the zone page (server) and its
// charts (client). Temperature and moisture use the species' comfortable band; ammonia has no
// species band, so it is read against the bin's ammonia rule lines (lib/domain/rules/params.ts).
import { classifyMoisture, classifyTemperature, type SpeciesProfile } from "@/lib/domain/species";
import { formatNumber, formatPercent, formatTemperature, temperatureForDisplay, UNIT_LABELS, type UnitSystem } from "@/lib/domain/units";
import type { ChartMetric } from "./zone-chart";

export type AmmoniaLines = { headsUpAtPpm: number; actNowAtPpm: number };

/** A band word for StatusMark and the label shown with it. */
export type MetricStatus = { band: string | null; label: string };

export function ammoniaStatus(ppm: number, lines: AmmoniaLines): MetricStatus {
  // Ammonia has its own mark (fumes), not the heat mark; "too …" draws it heavier.
  if (ppm >= lines.actNowAtPpm) return { band: "too much ammonia", label: "at the act-now line" };
  if (ppm >= lines.headsUpAtPpm) return { band: "ammonia", label: "over the heads-up line" };
  return { band: "comfortable", label: "low" };
}

export function metricStatus(metric: ChartMetric, stored: number, profile: SpeciesProfile, lines: AmmoniaLines): MetricStatus {
  if (metric === "temperature") {
    const b = classifyTemperature(profile, stored);
    return { band: b, label: b ?? "no reading" };
  }
  if (metric === "moisture") {
    const b = classifyMoisture(profile, stored);
    return { band: b, label: b ?? "no reading" };
  }
  return ammoniaStatus(stored, lines);
}

export function formatMetric(metric: ChartMetric, stored: number, system: UnitSystem): string {
  if (metric === "temperature") return formatTemperature(stored, system);
  if (metric === "moisture") return formatPercent(stored, { digits: 1 });
  return `${formatNumber(stored, 1)} ppm`;
}

/** "23.4 °C, comfortable"; with an open alert on the metric a value inside the band never reads
 * "comfortable": "21.6 °C, in the band, but a heat alert is open". */
export function describeMetric(
  metric: ChartMetric,
  stored: number,
  profile: SpeciesProfile,
  lines: AmmoniaLines,
  system: UnitSystem,
  openAlert?: string | null,
) {
  const label = metricStatus(metric, stored, profile, lines).label;
  return `${formatMetric(metric, stored, system)}, ${openAlert && label === "comfortable" ? `in the band, but ${openAlert} is open` : label}`;
}

/** The shaded range in display units, with its words. */
export function metricBand(metric: ChartMetric, profile: SpeciesProfile, lines: AmmoniaLines, system: UnitSystem) {
  if (metric === "temperature") {
    const { comfortLow, comfortHigh } = profile.temperatureC;
    return {
      low: temperatureForDisplay(comfortLow, system),
      high: temperatureForDisplay(comfortHigh, system),
      words: `comfortable ${formatTemperature(comfortLow, system, { digits: 0 })}–${formatTemperature(comfortHigh, system, { digits: 0 })}`,
    };
  }
  if (metric === "moisture") {
    const { comfortLow, comfortHigh } = profile.moisturePct;
    return { low: comfortLow, high: comfortHigh, words: `comfortable ${comfortLow}–${comfortHigh} %` };
  }
  return { low: 0, high: lines.headsUpAtPpm, words: `below the heads-up line, ${formatNumber(lines.headsUpAtPpm, 0)} ppm` };
}

export const METRIC_TITLES: Record<ChartMetric, string> = { temperature: "Temperature", moisture: "Moisture", ammonia: "Ammonia" };
/** Each metric's line colour: a palette variable of app/globals.css, so charts follow the light or dark theme. */
export const METRIC_COLORS: Record<ChartMetric, string> = { temperature: "--color-clay-500", moisture: "--color-slate-500", ammonia: "--color-straw-800" };
export const displayUnit = (metric: ChartMetric, system: UnitSystem) =>
  metric === "temperature" ? UNIT_LABELS[system].temperature : metric === "moisture" ? "%" : "ppm";
