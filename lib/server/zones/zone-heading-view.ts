// Where a zone's readings are heading, in plain words, from the same trend code the rules use
// (rateAt and trendAt of lib/domain/rules/series.ts): temperature's rate over the last hour, and
// moisture's 24-hour trend with when it would reach the edge of the comfortable band.
import type { SeriesAnswer } from "@/db/queries/series";
import { rateAt, trendAt, type Sample } from "@/lib/domain/rules/series";
import { zonedFormat } from "@/lib/domain/clock";
import type { SpeciesProfile } from "@/lib/domain/species";
import { formatNumber, formatPercent, formatTemperatureRate, type UnitSystem } from "@/lib/domain/units";

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
/** The same windows as the heat rule's rise and the drying rule's trend by default (common practice). */
export const RATE_WINDOW_MS = 60 * MINUTE;
export const TREND_WINDOW_MS = 24 * HOUR;
export const TREND_MIN_SPAN_MS = 6 * HOUR;
/** A rate this small reads as steady: under a probe's usual resolution over the window (common practice). */
const STEADY_C_PER_HOUR = 0.1;
const STEADY_PCT_PER_DAY = 0.5;
/** Crossings further off than this are not worth a time. */
const CROSSING_HORIZON_MS = 7 * 24 * HOUR;

export type Heading = { metric: "temperature" | "moisture"; words: string; ratePerHour: number | null; crossingAt: number | null };

/** The probe line with the newest reading, as samples. */
function newestLine(answer: SeriesAnswer | undefined): Sample[] {
  let best: Sample[] = [];
  for (const line of answer?.series ?? []) {
    const s = line.t.map((t, i) => ({ t: t * 1000, v: line.mean[i]! }));
    if (s.length && (!best.length || s.at(-1)!.t > best.at(-1)!.t)) best = s;
  }
  return best;
}

function gapOf(s: readonly Sample[]): number {
  const d = s
    .slice(1)
    .map((p, i) => p.t - s[i]!.t)
    .sort((a, b) => a - b);
  const median = d[Math.floor(d.length / 2)] ?? 10 * MINUTE;
  return Math.max(3 * median, 10 * MINUTE);
}

export function temperatureHeading(answer: SeriesAnswer | undefined, system: UnitSystem): Heading {
  const s = newestLine(answer);
  const rate = s.length ? rateAt(s, s.length - 1, RATE_WINDOW_MS, gapOf(s)) : null;
  const words =
    rate === null
      ? "Too few readings in the last hour to say where it is heading."
      : Math.abs(rate) < STEADY_C_PER_HOUR
        ? "Steady over the last hour."
        : `${rate > 0 ? "Rising" : "Falling"} ${formatTemperatureRate(rate, system).replace(/^[+-]/, "")} over the last hour.`;
  return { metric: "temperature", words, ratePerHour: rate, crossingAt: null };
}

export function moistureHeading(answer: SeriesAnswer | undefined, profile: SpeciesProfile | null, timezone: string): Heading {
  const s = newestLine(answer);
  const last = s.at(-1);
  if (!last || !profile) return { metric: "moisture", words: "Too few readings to say where it is heading.", ratePerHour: null, crossingAt: null };
  const { comfortLow, comfortHigh } = profile.moisturePct;
  const probe = trendAt(s, s.length - 1, TREND_WINDOW_MS, TREND_MIN_SPAN_MS, comfortLow);
  if (!probe) return { metric: "moisture", words: "Fewer than 6 hours of readings: too soon to see a trend.", ratePerHour: null, crossingAt: null };
  const perDay = probe.ratePerHour * 24;
  if (Math.abs(perDay) < STEADY_PCT_PER_DAY)
    return { metric: "moisture", words: "Steady over the last 24 hours.", ratePerHour: probe.ratePerHour, crossingAt: null };
  const drying = perDay < 0;
  const edge = drying ? comfortLow : comfortHigh;
  const t = drying ? probe : trendAt(s, s.length - 1, TREND_WINDOW_MS, TREND_MIN_SPAN_MS, edge);
  const crossing = t?.crossingAt != null && t.crossingAt - last.t <= CROSSING_HORIZON_MS ? t.crossingAt : null;
  const when = zonedFormat(timezone, { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" });
  const inside = last.v >= comfortLow && last.v <= comfortHigh;
  const trend = `${drying ? "Drying" : "Wetting"} ${formatNumber(Math.abs(perDay), 1)} % points a day over the last 24 hours`;
  const words = crossing
    ? `${trend}; at this pace it reaches the ${drying ? "dry" : "wet"} edge of the band, ${formatPercent(edge, { digits: 0 })}, about ${when(crossing)}.`
    : `${trend}${inside ? "; no crossing of the band's edge within a week at this pace" : ""}.`;
  return { metric: "moisture", words, ratePerHour: probe.ratePerHour, crossingAt: crossing };
}
