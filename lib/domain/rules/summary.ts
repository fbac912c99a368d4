// What each alert rule does, in a keeper's words, from the numbers it runs on (the bin's own or the
// species defaults): "Tells the crew when the bed stays above 25 °C for 10 min". The rules screen
// says this first and folds each number's source away.
import { UNIT_LABELS, celsiusDeltaToFahrenheit, formatNumber, temperatureForDisplay, type UnitSystem } from "../units";
import type { RuleKind } from "./params";

type T = Record<string, number>;

// "25 °C", "77 °F", "24.5 °C": one decimal only when it says something.
const trim = (n: number, digits = 1) => String(Number(formatNumber(n, digits)));

function sayer(system: UnitSystem) {
  const u = UNIT_LABELS[system];
  return {
    temp: (c: number) => `${trim(temperatureForDisplay(c, system))} ${u.temperature}`,
    rate: (cPerHour: number) => `${trim(system === "metric" ? cPerHour : celsiusDeltaToFahrenheit(cPerHour))} ${u.temperature} an hour`,
    pct: (p: number) => `${trim(p)} %`,
    min: (m: number) => `${trim(m, 0)} min`,
    h: (h: number) => `${trim(h)} h`,
  };
}

/** One or two sentences on what a rule does with these numbers, in the farm's units. */
export function ruleInWords(kind: RuleKind, t: T, system: UnitSystem): string {
  const s = sayer(system);
  const held = (m: number) => (m > 0 ? ` for ${s.min(m)}` : "");
  const settles = (line: string) => `It settles once the bed has been back ${line} for ${s.min(t.settleMinutes!)}.`;
  switch (kind) {
    case "heat":
      return (
        `Tells the crew when the bed stays above ${s.temp(t.headsUpAboveC!)}${held(t.raiseMinutes!)} (heads-up), ` +
        `or at ${s.temp(t.actNowAtC!)} or more (act now). In the ${s.h(t.feedingWatchHours!)} after a feeding it also ` +
        `gives a heads-up when the bed warms faster than ${s.rate(t.riseRateCPerHour!)}. ` +
        settles(`at or below ${s.temp(t.headsUpAboveC! - t.deadbandC!)}`)
      );
    case "chill":
      return (
        `Tells the crew when the bed stays below ${s.temp(t.headsUpBelowC!)}${held(t.raiseMinutes!)} (heads-up), ` +
        `or below ${s.temp(t.actNowBelowC!)} (act now). ` +
        settles(`at or above ${s.temp(t.headsUpBelowC! + t.deadbandC!)}`)
      );
    case "drying":
      return (
        `Tells the crew when the bedding stays drier than ${s.pct(t.headsUpBelowPct!)} moisture${held(t.raiseMinutes!)} (heads-up), ` +
        `or drier than ${s.pct(t.actNowBelowPct!)} (act now); also a heads-up when the last ${s.h(t.trendWindowHours!)} ` +
        `show it drying past ${s.pct(t.headsUpBelowPct!)} within ${s.h(t.trendHorizonHours!)}. ` +
        settles(`at ${s.pct(t.headsUpBelowPct! + t.deadbandPct!)} or wetter`)
      );
    case "soggy":
      return (
        `Tells the crew when the bedding stays wetter than ${s.pct(t.headsUpAbovePct!)} moisture${held(t.raiseMinutes!)} (heads-up), ` +
        `or wetter than ${s.pct(t.actNowAbovePct!)} (act now). ` +
        settles(`at ${s.pct(t.headsUpAbovePct! - t.deadbandPct!)} or drier`)
      );
    case "ammonia":
      return (
        `With an ammonia probe: tells the crew when the air holds ${trim(t.headsUpAtPpm!)} ppm or more${held(t.raiseMinutes!)} (heads-up), ` +
        `or ${trim(t.actNowAtPpm!)} ppm or more (act now). Without one: a heads-up when a feeding of the last ${s.h(t.riskWatchHours!)} ` +
        `was rich in nitrogen (C:N below ${trim(t.riskCnBelow!)}) and its mix was wetter than ${s.pct(t.riskWetAbovePct!)}, ` +
        `or the zone warms faster than ${s.rate(t.riskWarmingCPerHour!)}.`
      );
    case "silent_probe":
      return (
        `Tells the crew when a probe misses ${trim(t.missedReports!, 0)} reports in a row, and never sooner than ${s.min(t.minSilentMinutes!)}. ` +
        (t.settleMinutes! > 0 ? `It settles once the probe has reported for ${s.min(t.settleMinutes!)}.` : "It settles as soon as the probe reports again.")
      );
    case "probe_fault":
      return (
        `Tells the crew when a probe sends values it cannot measure, or an unchanged value for ${s.h(t.stuckHours!)}${held(t.raiseMinutes!)}. ` +
        `It settles once the probe has read normally for ${s.min(t.settleMinutes!)}.`
      );
  }
}

/** Where a default comes from, worded for a keeper ("common practice" → "A usual keepers' value"). */
export function sourceInWords(source: string): string {
  if (source === "common practice") return "A usual keepers' value; no published figure.";
  if (source.startsWith("common practice")) return `A usual keepers' value${source.slice("common practice".length)}.`;
  if (source.startsWith("from memory: ")) {
    const what = source.slice("from memory: ".length).replace(/;?\s*not verified\)?$/, (m) => (m.endsWith(")") ? ")" : ""));
    return `${what[0]!.toUpperCase()}${what.slice(1)}. Not checked against the published source.`;
  }
  if (source.startsWith("species: ")) return `From the worm species: ${source.slice("species: ".length)}.`;
  return source;
}
