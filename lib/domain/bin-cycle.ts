// A bin's cycle on the scale of weeks: when the next feeding is due, and when the harvest side of a
// flow-through or windrow bin should be ready. Pure: dates in, dates and words out. Calendar dates
// are the farm's own ("YYYY-MM-DD", farm time zone), so "due 14 Nov" means the keeper's 14 Nov.
import { localClock } from "./clock";
import { linearFit } from "./trend";
import type { BinStyle, ZoneKind } from "./vocabulary";

/** Days between feedings when neither the bin nor the farm says (the farms column's default):
 * "fed every few weeks" is common practice, not a published figure. */
export const DEFAULT_FEEDING_INTERVAL_DAYS = 21;
/** Bounds of a feeding interval a person may set: daily to twice a year (common practice). */
export const FEEDING_INTERVAL_MIN = 1;
export const FEEDING_INTERVAL_MAX = 180;

/** How long castings cure on the harvest side after their last food: about six weeks, common
 * practice. No published curing time was found among our checked sources; keepers' guides say "a
 * month or two" without fresh food (Old Tom's Wormery, "Cure the Vermicompost Harvest Problem",
 * a keeper's blog), so six weeks sits inside that. */
export const CURING_DAYS = 42;

/** The top of the harvestable moisture range (% wet basis): common practice, not a published figure.
 * It sits below the worms' comfortable band (E. fetida: max weight gain at 70–85 %, Kaplan et al.
 * 1980 abstract), so the worms move toward the moister feeding side, and well above
 * where they die (50 %, Domínguez & Edwards 2011, V-2nd). */
export const HARVESTABLE_MOISTURE_TOP = 65;

/** Bin styles with a harvest side: food goes in at one end and finished castings come out at the
 * other (the vocabulary has no separate wedge style; a wedge is kept as a flow-through or windrow). */
export const HARVEST_SIDE_STYLES: readonly BinStyle[] = ["flow-through", "windrow"];

const DAY_MS = 86_400_000;

const wallMidnight = (date: string) => {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  return Date.UTC(y, m - 1, d);
};

/** A calendar date plus whole days. */
export function addDays(date: string, days: number): string {
  return new Date(wallMidnight(date) + days * DAY_MS).toISOString().slice(0, 10);
}

/** Whole calendar days from a to b (b − a). */
export function daysBetween(a: string, b: string): number {
  return Math.round((wallMidnight(b) - wallMidnight(a)) / DAY_MS);
}

/** The farm-local calendar date of an instant. */
export const localDate = (at: Date, timeZone: string) => localClock(at, timeZone).date;

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];

/** "5 Dec", with the year when it is not the year of `today` ("3 Feb 2027"). */
export function dayWords(date: string, today?: string): string {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  const year = today && today.slice(0, 4) !== date.slice(0, 4) ? ` ${y}` : "";
  return `${d} ${MONTHS[m - 1]}${year}`;
}

const plural = (n: number, one: string) => `${n} ${one}${n === 1 ? "" : "s"}`;
const pct = (v: number) => `${Math.round(v)} %`;
const rate = (v: number) => `${Math.abs(v).toFixed(1)} %/day`;

export type FeedingDue =
  | { status: "never"; intervalDays: number; words: string }
  | { status: "later" | "today" | "overdue"; intervalDays: number; lastFedOn: string; dueOn: string; daysLeft: number; overdueDays: number; words: string };

/** The next feeding: the last feeding's farm-local date plus the interval. */
export function nextFeeding(p: { lastFeedingAt: Date | null; intervalDays: number; today: string; timeZone: string }): FeedingDue {
  const every = `every ${plural(p.intervalDays, "day")}`;
  if (!p.lastFeedingAt) return { status: "never", intervalDays: p.intervalDays, words: `No feeding logged yet (fed ${every}).` };
  const lastFedOn = localDate(p.lastFeedingAt, p.timeZone);
  const dueOn = addDays(lastFedOn, p.intervalDays);
  const daysLeft = daysBetween(p.today, dueOn);
  const base = { intervalDays: p.intervalDays, lastFedOn, dueOn, daysLeft, overdueDays: Math.max(0, -daysLeft) };
  const last = `last fed ${dayWords(lastFedOn, p.today)}, ${every}`;
  if (daysLeft > 0) {
    return { ...base, status: "later", words: `Next feeding due ${dayWords(dueOn, p.today)}, in ${plural(daysLeft, "day")} (${last}).` };
  }
  if (daysLeft === 0) return { ...base, status: "today", words: `Feeding due today (${last}).` };
  return {
    ...base,
    status: "overdue",
    words: `Feeding overdue by ${plural(-daysLeft, "day")}: it was due ${dayWords(dueOn, p.today)} (${last}).`,
  };
}

/** The days between feedings: the bin's own, else the farm's, else the default; with where it came from. */
export function feedingInterval(binDays: number | null | undefined, farmDays: number | null | undefined) {
  if (binDays) return { days: binDays, from: "bin" as const };
  if (farmDays) return { days: farmDays, from: "farm" as const };
  return { days: DEFAULT_FEEDING_INTERVAL_DAYS, from: "default" as const };
}

type ZoneLike = { id: string; kind: ZoneKind; position: number };

/** The harvest side of a bin: its curing zone furthest from the feeding side, for the styles that
 * have one and at least two zones; null otherwise. */
export function harvestSideZone<Z extends ZoneLike>(style: BinStyle, zones: readonly Z[]): Z | null {
  if (!HARVEST_SIDE_STYLES.includes(style) || zones.length < 2) return null;
  const curing = zones.filter((z) => z.kind === "curing").sort((a, b) => b.position - a.position);
  return curing[0] ?? null;
}

export type MoisturePoint = { at: Date; pct: number };

export type HarvestEstimate = {
  /** The later of the curing date and the drying date; null when neither can be told. */
  readyOn: string | null;
  /** Ready on or before today. */
  ready: boolean;
  lastFedOn: string | null;
  /** What the last food into the harvest side was: a feeding there or a shift of material into it. */
  lastFedBy: "feeding" | "shift" | null;
  curingOn: string | null;
  moisture: { latestPct: number; perDay: number | null; dryingOn: string | null } | null;
  /** The reasoning, one sentence a line. */
  lines: string[];
};

/** When the harvest side should be ready: its last food plus the curing time, and its moisture
 * drying to the harvestable top on the straight line through its recent daily means (at least three
 * points over at least two days; fewer give no trend). */
export function harvestEstimate(p: {
  today: string;
  timeZone: string;
  lastFeedingAt: Date | null;
  lastShiftInAt: Date | null;
  moisture: readonly MoisturePoint[];
  curingDays?: number;
  harvestableTopPct?: number;
}): HarvestEstimate {
  const curingDays = p.curingDays ?? CURING_DAYS;
  const top = p.harvestableTopPct ?? HARVESTABLE_MOISTURE_TOP;
  const lines: string[] = [];
  const fed = p.lastFeedingAt?.getTime() ?? -Infinity;
  const shifted = p.lastShiftInAt?.getTime() ?? -Infinity;
  const lastAt = fed === -Infinity && shifted === -Infinity ? null : new Date(Math.max(fed, shifted));
  const lastFedBy = lastAt ? (shifted > fed ? "shift" : "feeding") : null;
  const lastFedOn = lastAt ? localDate(lastAt, p.timeZone) : null;
  const curingOn = lastFedOn ? addDays(lastFedOn, curingDays) : null;
  const weeks = curingDays % 7 === 0 ? plural(curingDays / 7, "week") : plural(curingDays, "day");
  if (lastFedOn && curingOn) {
    const what = lastFedBy === "shift" ? "Material last shifted onto the curing side" : "Curing side last fed";
    lines.push(`${what} ${dayWords(lastFedOn, p.today)}; castings cure about ${weeks} (common practice) → ${dayWords(curingOn, p.today)}.`);
  } else {
    lines.push(`No feeding or shift onto the curing side logged yet; castings cure about ${weeks} (common practice) after the last food.`);
  }

  const points = [...p.moisture].filter((m) => Number.isFinite(m.pct)).sort((a, b) => a.at.getTime() - b.at.getTime());
  let moisture: HarvestEstimate["moisture"] = null;
  let dryingOn: string | null = null;
  let dryingKnown = false;
  const latest = points.at(-1);
  if (!latest) {
    lines.push("No moisture readings from the curing side: the date rests on curing time alone.");
    dryingKnown = true;
  } else {
    const latestOn = localDate(latest.at, p.timeZone);
    const span = (latest.at.getTime() - points[0]!.at.getTime()) / DAY_MS;
    const fit = points.length >= 3 && span >= 2 ? linearFit(points.map((m) => ({ t: m.at.getTime() / DAY_MS, v: m.pct }))) : null;
    const perDay = fit ? fit.slope : null;
    const trend = perDay == null ? "no trend yet" : Math.abs(perDay) < 0.05 ? "steady" : `${perDay < 0 ? "falling" : "rising"} ${rate(perDay)}`;
    if (latest.pct <= top) {
      dryingOn = latestOn;
      dryingKnown = true;
      lines.push(`Moisture ${pct(latest.pct)} (${trend}), at or below ${pct(top)}: dry enough to harvest (common practice).`);
    } else if (perDay != null && perDay <= -0.05) {
      // A whole day past the crossing; the tiny allowance keeps 90.0000001 days (float noise) at 90.
      dryingOn = addDays(latestOn, Math.ceil((latest.pct - top) / -perDay - 1e-6));
      dryingKnown = true;
      lines.push(
        `Moisture ${pct(latest.pct)}, ${trend}, reaches ${pct(top)} about ${dayWords(dryingOn, p.today)} (harvestable below ${pct(top)}: common practice).`,
      );
    } else {
      lines.push(
        `Moisture ${pct(latest.pct)}, ${trend}: not drying toward ${pct(top)}, so no date until it does (harvestable below ${pct(top)}: common practice).`,
      );
    }
    moisture = { latestPct: latest.pct, perDay, dryingOn };
  }

  const readyOn = curingOn && dryingKnown ? (dryingOn && dryingOn > curingOn ? dryingOn : curingOn) : null;
  const ready = readyOn != null && readyOn <= p.today;
  if (readyOn) lines.push(ready ? `Ready to harvest since about ${dayWords(readyOn, p.today)}.` : `Ready about ${dayWords(readyOn, p.today)}.`);
  return { readyOn, ready, lastFedOn, lastFedBy, curingOn, moisture, lines };
}

export type Harvest = { at: Date; massKg: number };

/** Castings per farm-local month ("YYYY-MM"), oldest first, every month from the first harvest to
 * the last (a month without a harvest is 0, so the bars keep time). */
export function harvestsPerMonth(harvests: readonly Harvest[], timeZone: string): { month: string; massKg: number; count: number }[] {
  if (harvests.length === 0) return [];
  const byMonth = new Map<string, { massKg: number; count: number }>();
  for (const h of harvests) {
    const m = localDate(h.at, timeZone).slice(0, 7);
    const cur = byMonth.get(m) ?? { massKg: 0, count: 0 };
    byMonth.set(m, { massKg: cur.massKg + h.massKg, count: cur.count + 1 });
  }
  const months = [...byMonth.keys()].sort();
  const out: { month: string; massKg: number; count: number }[] = [];
  for (let m = months[0]!; m <= months.at(-1)!; m = nextMonth(m)) out.push({ month: m, ...(byMonth.get(m) ?? { massKg: 0, count: 0 }) });
  return out;
}

function nextMonth(m: string): string {
  const [y, mo] = m.split("-").map(Number) as [number, number];
  return mo === 12 ? `${y + 1}-01` : `${y}-${String(mo + 1).padStart(2, "0")}`;
}

/** "Nov 2026" for "2026-11". */
export const monthWords = (m: string) => `${MONTHS[Number(m.slice(5, 7)) - 1]} ${m.slice(0, 4)}`;

/** How the planned harvest stands beside the estimate, in words; null when nothing is planned. */
export function plannedHarvestWords(plannedOn: string | null, estimate: Pick<HarvestEstimate, "readyOn"> | null, today: string): string | null {
  if (!plannedOn) return null;
  const when = dayWords(plannedOn, today);
  const past = plannedOn < today ? ` (${plural(daysBetween(plannedOn, today), "day")} ago)` : plannedOn === today ? " (today)" : "";
  if (!estimate?.readyOn) return `Harvest planned for ${when}${past}.`;
  if (plannedOn < estimate.readyOn) {
    return `Harvest planned for ${when}${past}, before the estimate (${dayWords(estimate.readyOn, today)}): check the curing side is dry and finished first.`;
  }
  return `Harvest planned for ${when}${past}, on or after the estimate (${dayWords(estimate.readyOn, today)}).`;
}
