// Plain words for alert messages: where, what value, which way it is going. Numbers are stored
// metric; the farm's unit system only changes how a message prints them.
import { UNIT_LABELS, celsiusDeltaToFahrenheit, formatMass, formatNumber, formatTemperature, temperatureForDisplay, type UnitSystem } from "../units";
import type { ProbeContext, ZoneRuleInput } from "./types";
import { zonedFormat } from "../clock";
import { zoneInBin } from "../zone-words";

const MINUTE = 60_000;

export type Words = {
  /** "Long Bed North, fresh zone" */
  place: string;
  /** "red wigglers" */
  worms: string;
  /** "31.2 °C"; `fine` gives up to two decimals, without trailing zeros ("21.56 °C", "70.81 °F"). */
  temp: (c: number, fine?: "fine") => string;
  /** "15.0–25.0 °C" */
  tempRange: (lo: number, hi: number) => string;
  /** A rate without its sign: "2.1 °C/h". */
  rate: (cPerHour: number) => string;
  /** "rising 2.1 °C/h", "falling 0.4 °C/h", "steady"; "" when unknown. */
  tempTrend: (cPerHour: number | null) => string;
  /** A feeding's mass in the farm's units: "1.5 kg", "3.3 lb". */
  mass: (kg: number) => string;
  pct: (p: number) => string;
  pctRange: (lo: number, hi: number) => string;
  ppm: (x: number) => string;
  clock: (ms: number) => string;
  span: (ms: number) => string;
  probe: (p: Pick<ProbeContext, "code" | "label"> | undefined, id: number) => string;
};

export function span(ms: number): string {
  const min = Math.max(0, Math.round(ms / MINUTE));
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  const m = min % 60;
  if (h < 48) return m ? `${h} h ${m} min` : `${h} h`;
  const d = Math.floor(h / 24);
  const rest = h % 24;
  return rest ? `${d} days ${rest} h` : `${d} days`;
}

const clockIn = (timeZone: string): ((ms: number) => string) => zonedFormat(timeZone, { hour: "2-digit", minute: "2-digit" });

export function wordsFor(input: Pick<ZoneRuleInput, "zone" | "species" | "unitSystem" | "timeZone">): Words {
  const system: UnitSystem = input.unitSystem ?? "metric";
  const zone = input.zone;
  const rate = (c: number) => {
    const v = system === "metric" ? Math.abs(c) : celsiusDeltaToFahrenheit(Math.abs(c));
    return `${formatNumber(v, 1)} ${UNIT_LABELS[system].rate}`;
  };
  return {
    place: zoneInBin(zone.binName, { kind: zone.kind, name: zone.zoneName }),
    worms: `${input.species.commonName}s`,
    temp: (c, fine) =>
      fine ? `${Number(formatNumber(temperatureForDisplay(c, system), 2))} ${UNIT_LABELS[system].temperature}` : formatTemperature(c, system),
    tempRange: (lo, hi) => `${formatNumber(temperatureForDisplay(lo, system), 1)}–${formatTemperature(hi, system)}`,
    rate,
    tempTrend: (c) => {
      if (c === null || !Number.isFinite(c)) return "";
      if (Math.abs(c) < 0.1) return "steady";
      return `${c > 0 ? "rising" : "falling"} ${rate(c)}`;
    },
    mass: (kg) => formatMass(kg, system),
    pct: (p) => `${formatNumber(p, 1)} %`,
    pctRange: (lo, hi) => `${formatNumber(lo, 1)}–${formatNumber(hi, 1)} %`,
    ppm: (x) => `${formatNumber(x, x < 10 ? 1 : 0)} ppm`,
    clock: clockIn(input.timeZone ?? "UTC"),
    span,
    probe: (p, id) => `probe ${p?.label?.trim() || p?.code || `#${id}`}`,
  };
}

/** "31.2 °C and rising 2.1 °C/h" / "31.2 °C" */
export function withTrend(value: string, trend: string): string {
  return trend ? `${value} and ${trend}` : value;
}
