// How heavy a planned feeding is for its bin, said before it is logged. The line is the heat rule's
// own (lib/domain/rules/params.ts heat.heavyFeedKgPerM2, and heavyFeedKg for a bin with no size), so
// the form warns of exactly the feedings the heat rule then watches; the zone's share of the floor
// is taken the same way as there (lib/domain/rules/context.ts feedingLoad).
// Fresh feed can self-heat and kill the worms (Wikipedia "Vermicompost", "Climate and temperature",
// V); how much food makes a feeding heavy has no published figure: the line is common practice.
import { RULE_PARAMETERS } from "./rules/params";
import { KG_PER_LB, M_PER_FOOT, UNIT_LABELS, massForDisplay, type UnitSystem } from "./units";

const heatDefault = (key: "heavyFeedKgPerM2" | "heavyFeedKg") => {
  const spec = RULE_PARAMETERS.heat.find((p) => p.key === key)!;
  // Both are fixed for every species ("common practice"), so any species gives the default.
  return (spec.value as () => number)();
};
/** The heat rule's default heavy line per area of bed floor (kg/m²). */
export const HEAVY_FEED_KG_PER_M2 = heatDefault("heavyFeedKgPerM2");
/** … and for a bin with no size (kg). */
export const HEAVY_FEED_KG = heatDefault("heavyFeedKg");

// A published feeding rate, read on the page: "Multiply your square footage by 3" to get the pounds
// of food scraps a bin can handle each week (Worm Wizards, wormwizards.org, "Build one"). A community
// guide, not a study; other guides give a third of it (1 lb per cubic foot a week in a bin 1 ft deep).
export const WEEKLY_RATE_LB_PER_FT2 = 3;
export const WEEKLY_RATE_SOURCE = "Worm Wizards (wormwizards.org), 'Build one': up to 3 lb of scraps per square foot of bin a week";
const M2_PER_FT2 = M_PER_FOOT ** 2;
/** The same rate in kg per m² per week (3 lb/ft² ≈ 14.6 kg/m²). */
export const WEEKLY_RATE_KG_PER_M2 = (WEEKLY_RATE_LB_PER_FT2 * KG_PER_LB) / M2_PER_FT2;

/** The floor of a bin in m², or null when its length or width is unknown. */
export function floorAreaM2(lengthCm: number | null | undefined, widthCm: number | null | undefined): number | null {
  if (!lengthCm || !widthCm || !(lengthCm > 0) || !(widthCm > 0)) return null;
  return (lengthCm * widthCm) / 10_000;
}

export type BinForLoad = {
  /** The bin's floor, m²; null when its size is not known. */
  areaM2: number | null;
  /** Days between feedings (the bin's, else the farm's); null when not known (no rate is said). */
  intervalDays: number | null;
  /** The heat rule's line for this bin when an owner changed it; default HEAVY_FEED_KG_PER_M2. */
  heavyKgPerM2?: number;
  heavyKg?: number;
};

export type FeedingLoad =
  | { sized: false; kg: number; heavy: boolean; times: number; heavyKg: number }
  | {
      sized: true;
      kg: number;
      /** The floor the feeding goes on: the whole bin's, or one zone's share of it. */
      onM2: number;
      zoneShare: boolean;
      kgPerM2: number;
      heavyKgPerM2: number;
      /** kgPerM2 / heavyKgPerM2; heavy from 1, as the heat rule arms its watch. */
      times: number;
      heavy: boolean;
      /** The bin's whole floor spread over its feeding interval, kg/m² a week; null without an interval. */
      weeklyKgPerM2: number | null;
      aboveWeeklyRate: boolean;
    };

/**
 * How heavy `kg` of food is for the bin: per m² of the floor it goes on (one zone's share when fed
 * to one zone of several, as the heat rule reckons it), against the heat rule's line.
 */
export function loadForBin(kg: number, bin: BinForLoad, where: { zoneCount: number; toOneZone: boolean }): FeedingLoad | null {
  if (!Number.isFinite(kg) || kg <= 0) return null;
  const heavyKgPerM2 = bin.heavyKgPerM2 ?? HEAVY_FEED_KG_PER_M2;
  const heavyKg = bin.heavyKg ?? HEAVY_FEED_KG;
  if (bin.areaM2 === null || !(bin.areaM2 > 0)) {
    const times = heavyKg > 0 ? kg / heavyKg : Number.POSITIVE_INFINITY;
    return { sized: false, kg, heavy: times >= 1, times, heavyKg };
  }
  const zoneShare = where.toOneZone && where.zoneCount > 1;
  const onM2 = zoneShare ? bin.areaM2 / where.zoneCount : bin.areaM2;
  const kgPerM2 = kg / onM2;
  const times = heavyKgPerM2 > 0 ? kgPerM2 / heavyKgPerM2 : Number.POSITIVE_INFINITY;
  const weeklyKgPerM2 = bin.intervalDays != null && bin.intervalDays > 0 ? kg / bin.areaM2 / (bin.intervalDays / 7) : null;
  return {
    sized: true,
    kg,
    onM2,
    zoneShare,
    kgPerM2,
    heavyKgPerM2,
    times,
    heavy: times >= 1,
    weeklyKgPerM2,
    aboveWeeklyRate: weeklyKgPerM2 !== null && weeklyKgPerM2 > WEEKLY_RATE_KG_PER_M2,
  };
}

/** A number with at most `digits` decimals and no trailing zeros: 0.4, 38, 1.6. */
const trim = (x: number, digits: number) => String(Number(x.toFixed(digits)));
/** Two significant figures below 10, whole numbers above: what a keeper can act on. */
const sig = (x: number) => trim(x, x < 1 ? 2 : x < 10 ? 1 : 0);
const areaWords = (m2: number, system: UnitSystem) => (system === "metric" ? `${sig(m2)} m²` : `${sig(m2 / M2_PER_FT2)} ft²`);
const perAreaWords = (kgPerM2: number, system: UnitSystem) =>
  system === "metric" ? `${sig(kgPerM2)} kg/m²` : `${sig((kgPerM2 / KG_PER_LB) * M2_PER_FT2)} lb/ft²`;
const massWords = (kg: number, system: UnitSystem) => `${sig(massForDisplay(kg, system))} ${UNIT_LABELS[system].mass}`;

export type LoadWords = { heavy: boolean; lines: string[] };

/** The load in words for the feeding form, in the farm's units. */
export function feedingLoadWords(load: FeedingLoad, system: UnitSystem, zoneLabel = "this zone"): LoadWords {
  if (!load.sized) {
    return {
      heavy: load.heavy,
      lines: [
        load.heavy
          ? `${massWords(load.kg, system)} is a heavy feeding for a bin of unknown size: the heat rule watches the bin after ${massWords(load.heavyKg, system)} or more.`
          : `${massWords(load.kg, system)} is under the ${massWords(load.heavyKg, system)} the heat rule counts as heavy for a bin of unknown size.`,
      ],
    };
  }
  const on = `${areaWords(load.onM2, system)}${load.zoneShare ? ` (${zoneLabel}, its share of the bin)` : ""}`;
  const lines: string[] = [];
  if (load.heavy) {
    const feedings = Math.ceil(load.times);
    const keepUnder = load.heavyKgPerM2 * load.onM2;
    lines.push(
      `${massWords(load.kg, system)} on ${on} is ${perAreaWords(load.kgPerM2, system)}, heavy for this bin: a load this size can heat the bed. ` +
        `Spread it over ${feedings === 2 ? "two" : feedings} feedings or a bigger area (under ${massWords(keepUnder, system)} at a time here).`,
    );
  } else {
    lines.push(
      `${massWords(load.kg, system)} on ${on} is ${perAreaWords(load.kgPerM2, system)}, under the heat rule's heavy line of ${perAreaWords(load.heavyKgPerM2, system)}.`,
    );
  }
  if (load.aboveWeeklyRate && load.weeklyKgPerM2 !== null) {
    lines.push(
      `Over the feeding interval that is ${perAreaWords(load.weeklyKgPerM2, system)} a week, more than a guide's ${perAreaWords(WEEKLY_RATE_KG_PER_M2, system)} a week (${WEEKLY_RATE_SOURCE}).`,
    );
  }
  return { heavy: load.heavy, lines };
}
