// Demo scenario (invented for the demo only): half a year of Alder Row's readings and logbook, made
// up by a seeded random generator so the same end time and seed always give the same rows. Nothing
// here is measured; the bins' climates, dry rates, feed masses and harvest weights are invented to
// look plausible. The mix values come from the ingredient library through lib/domain/mix.ts, and the
// two alerts (a heat episode after a heavy feed, a probe that fell silent) come from replaying the
// real rules (lib/domain/rules) over the invented readings.
import { ingredients as library } from "@/lib/domain/ingredients";
import { checkMix, type MixItem } from "@/lib/domain/mix";
import { replay, type ReplayStep, type Transition } from "@/lib/domain/rules";
import { getSpecies, speciesProfiles } from "@/lib/domain/species";
import type { BinStyle, Metric, ZoneKind } from "@/lib/domain/vocabulary";

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
export const STEP_MS = 5 * MIN;
const YEAR = 365.25 * DAY;
// The warmest day of a Dublin year, roughly (invented for the demo: late July).
const MIDSUMMER = Date.UTC(2000, 6, 19);

export type HistoryZone = { id: string; kind: ZoneKind; position: number };
export type HistoryProbe = { id: number; code: string; zoneId: string; metrics: readonly string[] };
export type HistoryBin = {
  id: string;
  name: string;
  style: BinStyle;
  species: string;
  lengthCm: number;
  widthCm: number;
  zones: HistoryZone[];
  probes: HistoryProbe[];
};
export type HistoryInput = {
  /** The last reading's time; a multiple of 5 minutes. */
  endMs: number;
  days: number;
  seed: number;
  timeZone: string;
  farmId: string;
  keeperId: string;
  ownerId: string;
  bins: HistoryBin[];
  /** The shared library's ingredient ids by key. */
  ingredientIds: ReadonlyMap<string, string>;
};

/** One probe's series of one metric on a regular grid; NaN where the probe sent nothing. */
export type Series = { probeId: number; metric: Metric; startMs: number; stepMs: number; values: Float64Array };

type Log = { farmId: string; binId: string; zoneId: string | null; at: Date; byUserId: string; notes: string | null };
export type FeedingRow = Log & {
  totalKg: number;
  mixMoisturePct: number;
  mixCn: number | null;
  items: { ingredientId: string | null; name: string; massKg: number; moisturePct: number; carbonPct: number | null; nitrogenPct: number | null }[];
};
export type AlertRow = {
  farmId: string;
  binId: string;
  zoneId: string;
  probeId: number | null;
  kind: Transition["kind"];
  level: Transition["level"];
  state: "settled";
  subject: string;
  value: number | null;
  message: string;
  details: Record<string, unknown>;
  raisedAt: Date;
  claimedAt: Date | null;
  claimedBy: string | null;
  settledAt: Date;
  lastSentAt: Date;
  actNowAt: Date | null;
  events: { at: Date; type: string; userId: string | null; detail: Record<string, unknown> }[];
};
export type DemoHistory = {
  series: Series[];
  feedings: FeedingRow[];
  waterings: (Log & { litres: number })[];
  shifts: (Log & { toZoneId: string; volumeL: number })[];
  harvests: (Log & { massKg: number; volumeL: number })[];
  notes: (Log & { text: string })[];
  alerts: AlertRow[];
  /** Each probe's last values, for its row (battery, signal) and the simulated fleet. */
  last: Map<number, { temperature: number; moisture: number; batteryV: number; signalDbm: number }>;
};

/** mulberry32 with Box–Muller: small, fast, and the same numbers for the same seed on every machine. */
function prng(seed: number) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const gauss = () => Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next());
  const between = (lo: number, hi: number) => lo + (hi - lo) * next();
  return { next, gauss, between };
}
type Rng = ReturnType<typeof prng>;

/** Local wall-clock of the farm: the zone's offset looked up once an hour. */
function farmClock(timeZone: string) {
  const fmt = new Intl.DateTimeFormat("en-GB", {
    timeZone,
    hourCycle: "h23",
    year: "numeric",
    month: "2-digit",
    day: "2-digit",
    hour: "2-digit",
    minute: "2-digit",
  });
  const cache = new Map<number, number>();
  const parts = (t: number) => {
    const p = Object.fromEntries(fmt.formatToParts(new Date(t)).map((x) => [x.type, Number(x.value)]));
    return { y: p.year!, mo: p.month!, d: p.day!, h: p.hour!, mi: p.minute! };
  };
  const offset = (t: number) => {
    const k = Math.floor(t / HOUR);
    let o = cache.get(k);
    if (o === undefined) {
      const p = parts(k * HOUR);
      o = Date.UTC(p.y, p.mo - 1, p.d, p.h, p.mi) - k * HOUR;
      cache.set(k, o);
    }
    return o;
  };
  return {
    /** Hours since local midnight, fractional. */
    hourOf: (t: number) => ((((t + offset(t)) % DAY) + DAY) % DAY) / HOUR,
    /** The instant of hh:mm local on the local day of t. */
    at: (t: number, h: number, mi = 0) => {
      const p = parts(t);
      const guess = Date.UTC(p.y, p.mo - 1, p.d, h, mi);
      return guess - offset(guess);
    },
    month: (t: number) => parts(t).mo,
  };
}
type Clock = ReturnType<typeof farmClock>;

const seasonal = (t: number) => Math.cos((2 * Math.PI * (t - MIDSUMMER)) / YEAR);

/** How each demo bin's room behaves (invented for the demo). */
type Climate = {
  room: string;
  meanC: number;
  seasonC: number;
  dailyC: number;
  weatherSd: number;
  /** Moisture points lost a day: all year, more in winter (a heater), more in summer (sun). */
  dryPerDay: number;
  dryWinter: number;
  drySummer: number;
  /** The keeper waters once the bed has lost this many points. */
  waterAfterPts: number;
  litresPerPt: number;
  wet: Record<ZoneKind, number>;
  feed: { key: string; kg: [number, number] }[];
  harvestKg: [number, number];
};
const CLIMATES: Record<string, Climate> = {
  "Long Bed North": {
    room: "an insulated shed",
    meanC: 19.2,
    seasonC: 2.2,
    dailyC: 0.7,
    weatherSd: 0.12,
    dryPerDay: 0.22,
    dryWinter: 0,
    drySummer: 0.15,
    waterAfterPts: 4,
    litresPerPt: 6,
    wet: { fresh: 84, working: 80, curing: 76 },
    feed: [
      { key: "vegetable-scraps", kg: [1.2, 1.6] },
      { key: "coffee-grounds", kg: [0.3, 0.5] },
      { key: "corrugated-cardboard", kg: [0.15, 0.25] },
    ],
    harvestKg: [18, 26],
  },
  "Shed Tote": {
    room: "the garden shed",
    meanC: 16.5,
    seasonC: 3,
    dailyC: 0.8,
    weatherSd: 0.12,
    dryPerDay: 0.2,
    dryWinter: 0,
    drySummer: 0.1,
    waterAfterPts: 4.5,
    litresPerPt: 0.5,
    wet: { fresh: 80, working: 78, curing: 75 },
    feed: [
      { key: "vegetable-scraps", kg: [0.35, 0.5] },
      { key: "coffee-grounds", kg: [0.08, 0.12] },
      { key: "corrugated-cardboard", kg: [0.04, 0.06] },
    ],
    harvestKg: [3, 5],
  },
  "Tray Tower": {
    room: "the heated room",
    meanC: 22.4,
    seasonC: 0.8,
    dailyC: 0.5,
    weatherSd: 0.06,
    dryPerDay: 0.3,
    // The heater dries the room's air in winter: the tower loses moisture fastest then.
    dryWinter: 1.1,
    drySummer: 0,
    waterAfterPts: 5.5,
    litresPerPt: 0.15,
    wet: { fresh: 80, working: 78, curing: 76 },
    feed: [
      { key: "vegetable-scraps", kg: [0.13, 0.17] },
      { key: "coffee-grounds", kg: [0.04, 0.06] },
      { key: "corrugated-cardboard", kg: [0.02, 0.03] },
    ],
    harvestKg: [2, 3],
  },
  "Greenhouse Windrow": {
    room: "the greenhouse",
    meanC: 24.5,
    seasonC: 2.5,
    dailyC: 1.4,
    weatherSd: 0.18,
    dryPerDay: 0.3,
    dryWinter: 0.1,
    drySummer: 0.5,
    waterAfterPts: 5,
    litresPerPt: 20,
    wet: { fresh: 84, working: 81, curing: 77 },
    feed: [
      { key: "horse-manure", kg: [4, 5] },
      { key: "straw", kg: [0.5, 0.7] },
      { key: "vegetable-scraps", kg: [1.3, 1.7] },
    ],
    harvestKg: [60, 90],
  },
};
const DEFAULT_CLIMATE = CLIMATES["Long Bed North"]!;

// The heavy feed that heats Long Bed North's fresh end: lawn clippings with coffee grounds, C:N ≈ 18.
const HEAVY_FEED = [
  { key: "grass-clippings", kg: 3.5 },
  { key: "coffee-grounds", kg: 2 },
  { key: "vegetable-scraps", kg: 1.5 },
];
const HEAT_BIN = "Long Bed North";
const HEAT_DAYS_BEFORE_END = 47;
const SILENT_CODE = "alder-04";
const SILENT_DAYS_BEFORE_END = 63;

const ZONE_TEMP: Record<ZoneKind, number> = { fresh: 1.0, working: 0.5, curing: 0 };
const ZONE_DRY: Record<ZoneKind, number> = { fresh: 1, working: 0.9, curing: 0.75 };

/** Keeps a value inside (lo, hi) with a soft shoulder instead of a flat line. */
function soft(v: number, lo: number, hi: number, shoulder = 1) {
  if (v > hi - shoulder) return hi - shoulder + Math.tanh((v - (hi - shoulder)) / shoulder) * (shoulder - 0.3);
  if (v < lo + shoulder) return lo + shoulder - Math.tanh((lo + shoulder - v) / shoulder) * (shoulder - 0.3);
  return v;
}
const round2 = (v: number) => Math.round(v * 100) / 100;
const roundTo = (v: number, step: number) => Math.round(v / step) * step;

type Bump = { at: number; zone: string; shape: (dt: number) => number; metric: "temperature" | "moisture" | "ammonia" };
const rise = (amp: number, tauH: number) => (dt: number) =>
  dt < 0 || dt > 8 * tauH * HOUR ? 0 : amp * (dt / (tauH * HOUR)) * Math.exp(1 - dt / (tauH * HOUR));
const wetting = (amp: number, days: number) => (dt: number) =>
  dt < 0 || dt > 6 * days * DAY ? 0 : amp * (1 - Math.exp(-dt / HOUR)) * Math.exp(-dt / (days * DAY));
/** A heavy feed self-heating: warm-up from 2 h, about 1.9 °C an hour for 5 h, a plateau, then a cool-down. */
const selfHeating = (peak: number) => (dt: number) => {
  if (dt < 2 * HOUR) return 0;
  if (dt < 7 * HOUR) return (peak * (dt - 2 * HOUR)) / (5 * HOUR);
  if (dt < 10 * HOUR) return peak;
  return dt > 6 * DAY ? 0 : peak * Math.exp(-(dt - 10 * HOUR) / (9 * HOUR));
};

function mixOf(recipe: { key: string; kg: number }[], ids: ReadonlyMap<string, string>) {
  const items = recipe.map(({ key, kg }) => {
    const ing = library.find((i) => i.key === key);
    if (!ing || ing.moisturePct === null) throw new Error(`demo recipe uses ${key}, which has no moisture in the library`);
    return {
      ingredientId: ids.get(key) ?? null,
      name: ing.name,
      massKg: round2(kg),
      moisturePct: ing.moisturePct,
      carbonPct: ing.carbonPct,
      nitrogenPct: ing.nitrogenPct,
    };
  });
  const checked = checkMix(
    items.map((i): MixItem => ({
      name: i.name,
      massKg: i.massKg,
      moisturePct: i.moisturePct,
      carbonPct: i.carbonPct ?? undefined,
      nitrogenPct: i.nitrogenPct ?? undefined,
    })),
  );
  if (!checked.ok) throw new Error(`demo mix refused: ${checked.error.message}`);
  return {
    items,
    totalKg: round2(checked.value.totalMassKg),
    mixMoisturePct: round2(checked.value.moisturePct),
    mixCn: checked.value.cn === null ? null : round2(checked.value.cn),
  };
}

/** Days of the regular feeding walk: every 21–28 days either side of an anchor, inside the window. */
function feedingDays(rng: Rng, startMs: number, endMs: number, anchor: number) {
  const days = [anchor];
  for (let t = anchor - rng.between(21, 28) * DAY; t > startMs + DAY; t -= rng.between(21, 28) * DAY) days.unshift(t);
  for (let t = anchor + rng.between(21, 28) * DAY; t < endMs - 3 * DAY; t += rng.between(21, 28) * DAY) days.push(t);
  return days.filter((t) => t > startMs && t < endMs - 2 * DAY);
}

export function buildDemoHistory(input: HistoryInput): DemoHistory {
  const { endMs, days, farmId, keeperId, ownerId } = input;
  const startMs = endMs - days * DAY;
  const n = days * (DAY / STEP_MS) + 1;
  const clock = farmClock(input.timeZone);
  const out: DemoHistory = { series: [], feedings: [], waterings: [], shifts: [], harvests: [], notes: [], alerts: [], last: new Map() };
  const log = (binId: string, zoneId: string | null, at: number, byUserId = keeperId, notes: string | null = null): Log => ({
    farmId,
    binId,
    zoneId,
    at: new Date(at),
    byUserId,
    notes,
  });
  // The gap of the silent probe, on the grid: from a night's 01:20 to 08:40, local.
  const gapDay = endMs - SILENT_DAYS_BEFORE_END * DAY;
  const gap = { from: Math.ceil(clock.at(gapDay, 1, 20) / STEP_MS) * STEP_MS, to: Math.ceil(clock.at(gapDay, 8, 40) / STEP_MS) * STEP_MS };

  for (const [b, bin] of input.bins.entries()) {
    const rng = prng(input.seed * 1000 + b + 1);
    const c = CLIMATES[bin.name] ?? DEFAULT_CLIMATE;
    const species = getSpecies(bin.species) ?? speciesProfiles["eisenia-fetida"];
    const zones = [...bin.zones].sort((x, y) => x.position - y.position);
    const feedZone = zones[0]!;
    const harvestZone = zones[zones.length - 1]!;
    const bumps: Bump[] = [];
    const heavyAt = clock.at(endMs - HEAT_DAYS_BEFORE_END * DAY, 8, 40);
    const isHeatBin = bin.name === HEAT_BIN && episodeFits(input, heavyAt);

    // Feedings: every 3–4 weeks, mid-morning, to the fed zone.
    const anchor = isHeatBin ? heavyAt : startMs + rng.between(5, 25) * DAY;
    for (const day of feedingDays(rng, startMs, endMs, anchor)) {
      const heavy = isHeatBin && day === heavyAt;
      const at = heavy ? heavyAt : clock.at(day, 9 + Math.floor(rng.next() * 3), Math.floor(rng.next() * 12) * 5);
      const mix = mixOf(heavy ? HEAVY_FEED : c.feed.map((f) => ({ key: f.key, kg: rng.between(f.kg[0], f.kg[1]) })), input.ingredientIds);
      const notes = heavy ? "A big load of lawn clippings from the school's mowing day, with the café's coffee grounds." : null;
      out.feedings.push({ ...log(bin.id, feedZone.id, at, keeperId, notes), ...mix });
      if (heavy) {
        bumps.push({ at, zone: feedZone.id, metric: "temperature", shape: selfHeating(9.8) });
        bumps.push({ at, zone: feedZone.id, metric: "ammonia", shape: selfHeating(5.5) });
        if (zones[1]) bumps.push({ at: at + 6 * HOUR, zone: zones[1].id, metric: "temperature", shape: rise(1.2, 14) });
      } else {
        bumps.push({ at, zone: feedZone.id, metric: "temperature", shape: rise(0.7, 18) });
        bumps.push({ at, zone: feedZone.id, metric: "ammonia", shape: rise(1.2, 18) });
        if (zones[1]) bumps.push({ at, zone: zones[1].id, metric: "temperature", shape: rise(0.25, 24) });
      }
      bumps.push({ at, zone: feedZone.id, metric: "moisture", shape: wetting(heavy ? 2.5 : 1.2, 3) });
    }

    // Harvests every 1–2 months from the harvest side, each followed by the shifts that refill it.
    for (let t = startMs + rng.between(10, 40) * DAY; t < endMs - 2 * DAY; t += rng.between(35, 55) * DAY) {
      const at = clock.at(t, 14, 5 * Math.floor(rng.next() * 12));
      const massKg = round2(rng.between(c.harvestKg[0], c.harvestKg[1]));
      // Castings weigh about 0.55 kg a litre (invented for the demo).
      const volumeL = roundTo(massKg / rng.between(0.5, 0.6), 0.5);
      const by = rng.next() < 0.3 ? ownerId : keeperId;
      const note = rng.next() < 0.4 ? "Screened through 6 mm mesh; the worms went back to the working zone." : null;
      out.harvests.push({ ...log(bin.id, harvestZone.id, at, by, note), massKg, volumeL });
      if (bin.style === "flow-through" || bin.style === "windrow") {
        for (let i = zones.length - 1; i > 0; i--) {
          const from = zones[i - 1]!;
          const to = zones[i]!;
          const shiftAt = at + (zones.length - i) * 20 * MIN;
          out.shifts.push({ ...log(bin.id, from.id, shiftAt, by), toZoneId: to.id, volumeL: roundTo(volumeL * rng.between(0.7, 1), 1) });
          bumps.push({ at: shiftAt, zone: to.id, metric: "temperature", shape: rise(0.4, 24) });
          bumps.push({ at: shiftAt, zone: to.id, metric: "moisture", shape: wetting(1.5, 8) });
        }
      }
    }

    // Readings, with the keeper's waterings decided at the morning check from the bed's dryness.
    const temp = new Map(zones.map((z) => [z.id, new Float64Array(n)]));
    const wet = new Map(zones.map((z) => [z.id, new Float64Array(n)]));
    const ammonia = new Map(zones.map((z) => [z.id, new Float64Array(n)]));
    let deficit = c.waterAfterPts * rng.next();
    let pending = 0;
    let weatherPrev = rng.gauss() * c.weatherSd * 4;
    let weatherNext = weatherPrev * 0.97 + rng.gauss() * c.weatherSd;
    let nextCheck = clock.at(startMs + DAY, 9, 30);
    const zoneBumps = bumps.sort((x, y) => x.at - y.at);
    let active: Bump[] = [];
    let bi = 0;
    for (let i = 0; i < n; i++) {
      const t = startMs + i * STEP_MS;
      if (t % HOUR === 0) {
        weatherPrev = weatherNext;
        weatherNext = weatherPrev * 0.97 + rng.gauss() * c.weatherSd;
      }
      const weather = weatherPrev + ((weatherNext - weatherPrev) * (t % HOUR)) / HOUR;
      const s = seasonal(t);
      const daily = c.dailyC * Math.sin((2 * Math.PI * (clock.hourOf(t) - 9)) / 24);
      const room = c.meanC + c.seasonC * s + weather + daily;
      deficit += ((c.dryPerDay + c.dryWinter * Math.max(0, -s) + c.drySummer * Math.max(0, s)) * STEP_MS) / DAY;
      const soak = pending * (1 - Math.exp(-STEP_MS / (40 * MIN)));
      pending -= soak;
      deficit -= soak;
      if (t >= nextCheck) {
        if (deficit >= c.waterAfterPts * rng.between(0.9, 1.1)) {
          const pts = deficit + rng.between(0.3, 1);
          const litres = roundTo(pts * c.litresPerPt, c.litresPerPt < 1 ? 0.05 : 0.5);
          out.waterings.push({ ...log(bin.id, null, t, rng.next() < 0.2 ? ownerId : keeperId), litres: round2(litres) });
          pending += litres / c.litresPerPt;
        }
        nextCheck = clock.at(t + DAY, 9, 25 + Math.floor(rng.next() * 4) * 5);
      }
      while (bi < zoneBumps.length && zoneBumps[bi]!.at <= t) active.push(zoneBumps[bi++]!);
      if (t % HOUR === 0) active = active.filter((x) => t - x.at < 8 * DAY);
      for (const z of zones) {
        let dT = 0;
        let dM = 0;
        let dA = 0;
        for (const x of active) {
          if (x.zone !== z.id) continue;
          const v = x.shape(t - x.at);
          if (x.metric === "temperature") dT += v;
          else if (x.metric === "moisture") dM += v;
          else dA += v;
        }
        const tc = species.temperatureC;
        const base = soft(room + ZONE_TEMP[z.kind], tc.comfortLow, tc.comfortHigh);
        // Only the heavy feed may push a zone out of its band; everything else stays inside.
        const heated = dT > 2 ? base + dT : soft(base + dT, tc.comfortLow, tc.comfortHigh);
        temp.get(z.id)![i] = round2(heated + rng.gauss() * 0.08);
        const mc = species.moisturePct;
        const m = soft(c.wet[z.kind] - ZONE_DRY[z.kind] * deficit + dM, mc.comfortLow + 1, mc.comfortHigh, 1.5);
        wet.get(z.id)![i] = round2(m + rng.gauss() * 0.25);
        ammonia.get(z.id)![i] = round2(Math.max(0, 1.5 + dA + rng.gauss() * 0.2));
      }
    }

    for (const p of bin.probes) {
      const silent = p.code === SILENT_CODE && episodeFits(input, gap.from);
      const missing = (t: number) => silent && t >= gap.from && t < gap.to;
      const pick = (src: Float64Array, metric: Metric) => {
        const values = new Float64Array(n);
        for (let i = 0; i < n; i++) values[i] = missing(startMs + i * STEP_MS) ? NaN : src[i]!;
        out.series.push({ probeId: p.id, metric, startMs, stepMs: STEP_MS, values });
        return values;
      };
      const tv = pick(temp.get(p.zoneId)!, "temperature");
      const mv = pick(wet.get(p.zoneId)!, "moisture");
      if (p.metrics.includes("ammonia")) pick(ammonia.get(p.zoneId)!, "ammonia");
      // Battery and signal hourly: a slow discharge, a fresh battery after the silent night.
      const hStart = Math.ceil(startMs / HOUR) * HOUR;
      const hours = Math.floor((endMs - hStart) / HOUR) + 1;
      const bat = new Float64Array(hours);
      const sig = new Float64Array(hours);
      const signalBase = -62 - rng.next() * 16;
      let v = silent ? 3.82 : 4.1 - rng.next() * 0.1;
      for (let h = 0; h < hours; h++) {
        const t = hStart + h * HOUR;
        v -= silent && t < gap.from ? 0.00013 : 0.00004;
        if (silent && t >= gap.to && t - HOUR < gap.to) v = 4.12;
        bat[h] = missing(t) ? NaN : round2(v + rng.gauss() * 0.005);
        sig[h] = missing(t) ? NaN : Math.round(Math.max(-110, signalBase + rng.gauss() * 2));
      }
      out.series.push({ probeId: p.id, metric: "battery-voltage", startMs: hStart, stepMs: HOUR, values: bat });
      out.series.push({ probeId: p.id, metric: "signal", startMs: hStart, stepMs: HOUR, values: sig });
      out.last.set(p.id, { temperature: tv[n - 1]!, moisture: mv[n - 1]!, batteryV: bat[hours - 1]!, signalDbm: sig[hours - 1]! });
    }

    // Notes a keeper would leave (invented for the demo).
    if (bin.name === "Tray Tower") {
      const oct = firstDayOfMonth(clock, startMs, endMs, 10);
      if (oct !== null) out.notes.push({ ...log(bin.id, null, clock.at(oct + 4 * DAY, 18, 10)), text: `Heater on in ${c.room}: nights below 15 °C.` });
    }
    if (bin.name === "Greenhouse Windrow") {
      const sep = firstDayOfMonth(clock, startMs, endMs, 9);
      if (sep !== null) out.notes.push({ ...log(bin.id, null, clock.at(sep + 27 * DAY, 16, 0), ownerId), text: "Shade cloth down for the winter." });
    }
  }

  out.alerts.push(...heatAlert(input, out, clock), ...silentAlert(input, out, gap, clock));
  for (const k of ["feedings", "waterings", "shifts", "harvests", "notes"] as const) out[k].sort((x, y) => x.at.getTime() - y.at.getTime());
  return out;
}

/** The keeper does the paperwork between 07:00 and 22:00: a night-time moment moves to the next morning. */
function awake(clock: Clock, t: number) {
  const h = clock.hourOf(t);
  if (h >= 7 && h < 22) return t;
  return clock.at(h >= 22 ? t + 12 * HOUR : t, 7, 45);
}

function firstDayOfMonth(clock: Clock, startMs: number, endMs: number, month: number) {
  for (let t = startMs; t < endMs; t += DAY) if (clock.month(t) === month && clock.month(t - DAY) !== month) return t;
  return null;
}

function pointsOf(s: Series, from: number, to: number) {
  const points: { t: number; v: number }[] = [];
  const i0 = Math.max(0, Math.ceil((from - s.startMs) / s.stepMs));
  const i1 = Math.min(s.values.length - 1, Math.floor((to - s.startMs) / s.stepMs));
  for (let i = i0; i <= i1; i++) if (!Number.isNaN(s.values[i]!)) points.push({ t: s.startMs + i * s.stepMs, v: s.values[i]! });
  return points;
}

/** Replays one zone's rules of one kind over a window, 5 minutes a step, as the live runner met them. */
function replayZone(input: HistoryInput, h: DemoHistory, bin: HistoryBin, zone: HistoryZone, kind: "heat" | "silent_probe", from: number, to: number) {
  const species = getSpecies(bin.species) ?? speciesProfiles["eisenia-fetida"];
  const probes = bin.probes.filter((p) => p.zoneId === zone.id);
  const ids = new Set(probes.map((p) => p.id));
  const readings = h.series
    .filter((s) => ids.has(s.probeId) && (s.metric === "temperature" || s.metric === "moisture"))
    .map((s) => ({ probeId: s.probeId, metric: s.metric, points: pointsOf(s, from - 5 * DAY, to) }));
  const times: number[] = [];
  for (let t = from; t <= to; t += STEP_MS) times.push(t);
  return replay(
    {
      zone: { id: zone.id, kind: zone.kind, binName: bin.name },
      species,
      bed: { lengthCm: bin.lengthCm, widthCm: bin.widthCm, zoneCount: bin.zones.length },
      readings,
      recentFeedings: h.feedings
        .filter((f) => f.binId === bin.id)
        .map((f) => ({ at: f.at.getTime(), zoneId: f.zoneId, mixMoisturePct: f.mixMoisturePct, mixCn: f.mixCn, totalKg: f.totalKg })),
      probes: probes.map((p) => ({ id: p.id, code: p.code, reportIntervalS: 60, lastSeenAt: null, metrics: p.metrics })),
      kinds: [kind],
      unitSystem: "metric",
      timeZone: input.timeZone,
    },
    times,
  );
}

/** The alert row and its events from a replay's transitions: raised by the rule, claimed by the
 * keeper, settled by the keeper with a note or by the rule. */
function alertFrom(
  input: HistoryInput,
  clock: Clock,
  bin: HistoryBin,
  steps: ReplayStep[],
  o: { claimAfterMs: number; settledBy: "keeper" | "rule"; note?: string },
): AlertRow | null {
  const all = steps.flatMap((s) => s.transitions.map((t) => ({ at: s.at, t })));
  const raised = all.find((x) => x.t.type === "raise");
  if (!raised) return null;
  const settled = all.find((x) => x.t.type === "settle" && x.at > raised.at);
  if (!settled) return null;
  const during = all.filter((x) => x.at >= raised.at && x.at < settled.at && x.t.type !== "settle");
  const escalated = during.find((x) => x.t.type === "escalate");
  const latest = during[during.length - 1]!.t;
  const claimAt = raised.at + o.claimAfterMs;
  const settleAt = o.settledBy === "keeper" ? awake(clock, settled.at + 10 * MIN) : settled.at;
  const events: AlertRow["events"] = [
    { at: new Date(raised.at), type: "raised", userId: null, detail: { level: raised.t.level, value: raised.t.value, message: raised.t.message } },
  ];
  if (escalated)
    events.push({ at: new Date(escalated.at), type: "escalated", userId: null, detail: { value: escalated.t.value, message: escalated.t.message } });
  const claimed = claimAt < settleAt;
  if (claimed) events.push({ at: new Date(claimAt), type: "claimed", userId: input.keeperId, detail: {} });
  events.push(
    o.settledBy === "keeper"
      ? { at: new Date(settleAt), type: "settled", userId: input.keeperId, detail: o.note ? { note: o.note } : {} }
      : { at: new Date(settleAt), type: "settled", userId: null, detail: { value: settled.t.value, message: settled.t.message } },
  );
  events.sort((x, y) => x.at.getTime() - y.at.getTime());
  return {
    farmId: input.farmId,
    binId: bin.id,
    zoneId: raised.t.zoneId,
    probeId: latest.probeId,
    kind: raised.t.kind,
    level: escalated ? "act_now" : raised.t.level,
    state: "settled",
    subject: raised.t.subject,
    value: latest.value,
    message: latest.message,
    details: latest.details,
    raisedAt: new Date(raised.at),
    claimedAt: claimed ? new Date(claimAt) : null,
    claimedBy: claimed ? input.keeperId : null,
    settledAt: new Date(settleAt),
    lastSentAt: new Date(escalated?.at ?? raised.at),
    actNowAt: escalated ? new Date(escalated.at) : raised.t.level === "act_now" ? new Date(raised.at) : null,
    events,
  };
}

/** A short history (a test's, a quick start's) leaves out an episode it has no room for: the rules
 * look back days before it. */
const episodeFits = (input: HistoryInput, at: number) => at - 6 * DAY > input.endMs - input.days * DAY;

function heatAlert(input: HistoryInput, h: DemoHistory, clock: Clock): AlertRow[] {
  const bin = input.bins.find((b) => b.name === HEAT_BIN);
  const zone = bin?.zones.find((z) => z.kind === "fresh");
  if (!bin || !zone) return [];
  const heavyAt = clock.at(input.endMs - HEAT_DAYS_BEFORE_END * DAY, 8, 40);
  if (!episodeFits(input, heavyAt)) return [];
  const from = Math.ceil(heavyAt / STEP_MS) * STEP_MS;
  const note = "Forked a bucket of shredded cardboard through the fresh end and left the lid off; cooling now.";
  const a = alertFrom(input, clock, bin, replayZone(input, h, bin, zone, "heat", from, from + 3 * DAY), { claimAfterMs: 20 * MIN, settledBy: "keeper", note });
  if (!a) throw new Error("demo scenario: the heavy feed raised no heat alert");
  h.notes.push({
    farmId: input.farmId,
    binId: bin.id,
    zoneId: zone.id,
    at: new Date(a.claimedAt!.getTime() + 25 * MIN),
    byUserId: input.keeperId,
    notes: null,
    text: note,
  });
  return [a];
}

function silentAlert(input: HistoryInput, h: DemoHistory, gap: { from: number; to: number }, clock: Clock): AlertRow[] {
  const bin = input.bins.find((b) => b.probes.some((p) => p.code === SILENT_CODE));
  const probe = bin?.probes.find((p) => p.code === SILENT_CODE);
  const zone = bin?.zones.find((z) => z.id === probe?.zoneId);
  if (!bin || !probe || !zone || !episodeFits(input, gap.from)) return [];
  // The keeper sees it at breakfast and goes out with a battery.
  const claimAt = clock.at(gap.from, 7, 50);
  const steps = replayZone(input, h, bin, zone, "silent_probe", gap.from - HOUR, gap.to + 3 * HOUR);
  const raisedAt = steps.find((s) => s.transitions.some((t) => t.type === "raise"))?.at ?? gap.from;
  const a = alertFrom(input, clock, bin, steps, { claimAfterMs: claimAt - raisedAt, settledBy: "rule" });
  if (!a) throw new Error("demo scenario: the silent probe raised no alert");
  h.notes.push({
    farmId: input.farmId,
    binId: bin.id,
    zoneId: zone.id,
    at: new Date(gap.to + 5 * MIN),
    byUserId: input.keeperId,
    notes: null,
    text: `Probe ${SILENT_CODE} went quiet overnight: flat battery, swapped for a fresh one.`,
  });
  return [a];
}

/** The readings as COPY text lines (probe_id, metric, ts, value), a chunk at a time. */
export function* readingLines(series: readonly Series[], chunkRows = 4000): Generator<string> {
  const iso = new Map<number, string>();
  const isoOf = (t: number) => {
    let s = iso.get(t);
    if (s === undefined) iso.set(t, (s = new Date(t).toISOString()));
    return s;
  };
  let buf: string[] = [];
  for (const s of series) {
    for (let i = 0; i < s.values.length; i++) {
      const v = s.values[i]!;
      if (Number.isNaN(v)) continue;
      buf.push(`${s.probeId}\t${s.metric}\t${isoOf(s.startMs + i * s.stepMs)}\t${v}\n`);
      if (buf.length >= chunkRows) {
        yield buf.join("");
        buf = [];
      }
    }
  }
  if (buf.length) yield buf.join("");
}

/** Hourly rollups (hour cut in UTC, like the ingest writer's) of the same values, as COPY text lines. */
export function* rollupLines(series: readonly Series[]): Generator<string> {
  let buf: string[] = [];
  for (const s of series) {
    let hour = NaN;
    let min = 0;
    let max = 0;
    let sum = 0;
    let count = 0;
    const flush = () => {
      if (count > 0) buf.push(`${s.probeId}\t${s.metric}\t${new Date(hour).toISOString()}\t${min}\t${max}\t${sum}\t${count}\n`);
      count = 0;
    };
    for (let i = 0; i < s.values.length; i++) {
      const v = s.values[i]!;
      if (Number.isNaN(v)) continue;
      const t = s.startMs + i * s.stepMs;
      const h = t - (t % HOUR);
      if (h !== hour) {
        flush();
        hour = h;
        min = max = sum = v;
        count = 1;
      } else {
        if (v < min) min = v;
        if (v > max) max = v;
        sum += v;
        count += 1;
      }
    }
    flush();
    if (buf.length >= 4000) {
      yield buf.join("");
      buf = [];
    }
  }
  if (buf.length) yield buf.join("");
}

export const countReadings = (series: readonly Series[]) => series.reduce((n, s) => n + s.values.reduce((k, v) => (Number.isNaN(v) ? k : k + 1), 0), 0);
