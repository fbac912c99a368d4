// What each alert rule does, in a keeper's words, from the numbers it runs on (the bin's own or the
// species defaults): "Tells the crew when the bed stays above 25 °C for 10 min". The rules screen
// says this first and folds each number's source away.
import { KG_PER_LB, M_PER_FOOT, UNIT_LABELS, celsiusDeltaToFahrenheit, formatNumber, temperatureForDisplay, type UnitSystem } from "../units";
import type { SpeciesId } from "../vocabulary";
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
    // Food per floor area of bed: kg per square metre, or pounds per square foot.
    perArea: (kgPerM2: number) =>
      system === "metric" ? `${trim(kgPerM2)} kg or more per square metre` : `${trim((kgPerM2 / KG_PER_LB) * M_PER_FOOT ** 2, 2)} lb or more per square foot`,
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
        `or at ${s.temp(t.actNowAtC!)} or more (act now). After a heavy feeding (${s.perArea(t.heavyFeedKgPerM2!)} of bed) ` +
        `it watches for ${s.h(t.feedingWatchHours!)}, longer for heavier ones up to ${s.h(t.feedingWatchMaxHours!)}, and gives a heads-up when ` +
        `the bed warms ${s.rate(t.riseRateCPerHour!)} faster than it usually does at that hour over the last ${trim(t.rhythmDays!, 0)} days. ` +
        settles(`at or below ${s.temp(t.headsUpAboveC! - t.deadbandC!)}`)
      );
    case "chill":
      return (
        `Tells the crew when the bed stays below ${s.temp(t.headsUpBelowC!)}${held(t.raiseMinutes!)} (heads-up), ` +
        `or below ${s.temp(t.actNowBelowC!)}, close to the cold that kills the worms (act now). ` +
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
        `was rich in nitrogen (C:N below ${trim(t.riskCnBelow!)}) and its mix was wetter than ${s.pct(t.riskWetAbovePct!)} ` +
        `(for ${s.h(t.riskWetHours!)}, while the zone is not cooling), or the zone warms faster than ${s.rate(t.riskWarmingCPerHour!)}. ` +
        `It settles once those causes are gone for ${s.min(t.settleMinutes!)}.`
      );
    case "silent_probe":
      return (
        `Tells the crew when a probe misses ${trim(t.missedReports!, 0)} reports in a row, and never sooner than ${s.min(t.minSilentMinutes!)}. ` +
        `It is raised once for a spell of dropped reports: it settles only after ${s.min(t.settleMinutes!)} of reports on time, at least three in a row.`
      );
    case "probe_fault":
      return (
        `Tells the crew when a probe sends values it cannot measure${held(t.raiseMinutes!)}, or an unchanged value for ${s.h(t.stuckHours!)} ` +
        `(longer for a probe that reads in coarse steps, such as whole percent, up to ${s.h(t.stuckMaxHours!)}). ` +
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

/**
 * "Where this comes from": each species line in plain words, with the source taken and, where the
 * published sources disagree, which one was taken and why. Shown under the rule's numbers.
 */
export const BAND_SOURCES: Record<SpeciesId, readonly string[]> = {
  "eisenia-fetida": [
    'Comfortable 15–25 °C and survival from 0 °C with enough bedding: NC State Extension, "Earthworms and Worm Bins". So the act-now chill line sits just above freezing, not at 10 °C.',
    "Growth falls off at 30 °C and the worms die at 35 °C: Loehr and others, 1985.",
    "Moisture: Kaplan and others (1980) found most weight gain at 70–85 %, but three later sources put the best growth higher: 80–90 % (Domínguez and Edwards, 2011), 84–91 % (Loehr and others, 1985) and the most cocoons at 85 % (van Gestel and others, 1992). We take 70–90 %, so a bed inside a published optimum is never called soggy.",
    "Act now for a wet bed above 93 %: a usual keepers' value, two points past the wettest published optimum (91 %), beyond a probe's error.",
  ],
  "eisenia-hortensis": [
    "A cooler worm than the red wiggler (Domínguez and Edwards, 2011). Loehr and others (1985) put the best growth of all five worms they studied at 20–25 °C; we take the cooler source and keep the comfortable band at 12–22 °C, with act now from 27 °C. These two numbers are usual keepers' values.",
    "Moisture 67–84 %: the moisture-tower study of this worm by Viljoen and Reinecke.",
    "It survives cold better than the red wiggler (a cold-tolerance study, American Midland Naturalist, 2011).",
  ],
  "eudrilus-eugeniae": [
    "Comfortable 20–25 °C (Loehr and others, 1985); dies below 9 °C and above 30 °C (Domínguez and Edwards, 2011, citing Viljoen and Reinecke). Loehr gives 35 °C for the heat death; we take the lower line, as this is a tropical worm kept in a warm room.",
    "Moisture 70–82 %: Viljoen and Reinecke's life-cycle and moisture studies of this worm.",
  ],
  "perionyx-excavatus": [
    "Comfortable 20–30 °C: Edwards, Domínguez and Neuhauser (1998) found its growth still rising up to 30 °C. Older advice (Loehr and others, 1985) stops at 25 °C, and one summary says it dies above 30 °C; we follow the 1998 growth study, so a bed at 28–29 °C is comfortable. Act now from 32 °C, a usual keepers' value between that optimum and the 35 °C die-off (Loehr and others, 1985).",
    "Dies below 9 °C (Domínguez and Edwards, 2011, citing Viljoen and Reinecke).",
    "Moisture: no study of this worm was read; the red wiggler's band is used.",
  ],
};
