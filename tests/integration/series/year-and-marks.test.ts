// Long ranges and logbook marks against the worker's PostgreSQL: a year is read from the hourly
// rollups in day buckets cut at the farm's midnight and spans the whole range; a zone's series
// brings the logbook entries that concern it, a bin's series one line per zone and all its entries.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db";
import { getBinSeries } from "@/lib/server/series/bin-series";
import { LEVELS, levelFor } from "@/lib/server/series/read-series";
import { getZoneSeries } from "@/lib/server/series/zone-series";
import { seriesQuery } from "@/lib/domain/validation/series";
import { makeFarm, type TestFarm } from "./fixtures";

let c: pg.Client;
let farm: TestFarm;
let newYork: TestFarm;
const HOUR = 3_600_000;
const DAY = 24 * HOUR;
// A fixed "now" at 09:00 UTC, so day buckets are partial at both ends of the year.
const END = Date.UTC(2025, 5, 1, 9, 0, 0);
const YEAR = 365 * DAY;
// An hour's rollup: value by hour, count varying, so weighted and unweighted means differ.
const hourMean = (h: number) => 18 + 4 * Math.sin((2 * Math.PI * (h % 24)) / 24) + (h % 5) / 10;
const hourCount = (h: number) => 6 + (h % 7);

const q = (fromMs: number, toMs: number, metric = "temperature") =>
  seriesQuery.parse({ metric, from: new Date(fromMs).toISOString(), to: new Date(toMs).toISOString() });

/** A year and a day of hourly rollups ending at END for a probe, as the ingest would have kept them. */
async function yearOfRollups(probeId: number, offset = 0) {
  await c.query(
    `insert into reading_rollups (probe_id, metric, hour, min, max, sum, count)
     select $1, 'temperature', to_timestamp(h * 3600), m - 1, m + 1, m * n, n
     from (select h, 18 + 4 * sin(2 * pi() * (h % 24) / 24) + (h % 5) / 10.0 + $4 as m, 6 + h % 7 as n
           from generate_series($2::bigint, $3::bigint) h) s`,
    [probeId, (END - YEAR - DAY) / HOUR, END / HOUR - 1, offset],
  );
}

beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
  farm = await makeFarm(c, { zones: ["fresh", "working", "curing"], probes: ["fresh", "fresh", "working"] });
  newYork = await makeFarm(c, { zones: ["working"], timezone: "America/New_York" });
  await yearOfRollups(farm.probes[0]!.id, 0);
  await yearOfRollups(farm.probes[1]!.id, 2);
  await yearOfRollups(farm.probes[2]!.id, -3);
  await yearOfRollups(newYork.probes[0]!.id, 0);
});

afterAll(async () => {
  await c.end();
  await closeDb();
});

describe("levels of a series", () => {
  it("the level rises with the range: raw to 3 days, then hourly, 6-hourly and daily rollups", () => {
    expect(levelFor(DAY)).toMatchObject({ source: "raw", bucketSeconds: null });
    expect(levelFor(3 * DAY)).toMatchObject({ source: "raw" });
    expect(levelFor(7 * DAY)).toMatchObject({ source: "rollup", bucketSeconds: 3600 });
    expect(levelFor(30 * DAY)).toMatchObject({ source: "rollup", bucketSeconds: 6 * 3600 });
    expect(levelFor(YEAR)).toMatchObject({ source: "rollup", bucketSeconds: 86_400 });
    // The longest range a request may ask (400 days) still has a level.
    expect(LEVELS.at(-1)!.upToMs).toBe(Infinity);
  });

  it("a year is answered from the rollups in day buckets spanning the whole range", async () => {
    const a = await getZoneSeries(farm.zones.fresh!, q(END - YEAR, END));
    expect(a).toMatchObject({ source: "rollup", bucketSeconds: 86_400, from: new Date(END - YEAR).toISOString() });
    for (const line of a.series) {
      // 365 whole days and the two partial ones at the ends.
      expect(line.t.length).toBe(366);
      expect(line.t[0]! * 1000).toBeLessThanOrEqual(END - YEAR);
      expect(END - YEAR - line.t[0]! * 1000).toBeLessThan(DAY);
      expect(END - line.t.at(-1)! * 1000).toBeLessThan(DAY);
      expect(line.t.every((t) => (t * 1000) % DAY === 0)).toBe(true);
    }
    // One whole day's point is the count-weighted mean of its 24 rollup hours, and their min and max.
    const line = a.series.find((s) => s.probeId === farm.probes[0]!.id)!;
    const k = 200;
    const h0 = (line.t[k]! * 1000) / HOUR;
    let sum = 0;
    let n = 0;
    let lo = Infinity;
    let hi = -Infinity;
    for (let h = h0; h < h0 + 24; h++) {
      sum += hourMean(h) * hourCount(h);
      n += hourCount(h);
      lo = Math.min(lo, hourMean(h) - 1);
      hi = Math.max(hi, hourMean(h) + 1);
    }
    expect(line.mean[k]).toBeCloseTo(sum / n, 9);
    expect(line.min[k]).toBeCloseTo(lo, 9);
    expect(line.max[k]).toBeCloseTo(hi, 9);
    // The first (partial) day holds only the hours from the range's start hour on.
    const first = (line.t[0]! * 1000) / HOUR;
    const startHour = (END - YEAR) / HOUR;
    let fs = 0;
    let fn = 0;
    for (let h = startHour; h < first + 24; h++) {
      fs += hourMean(h) * hourCount(h);
      fn += hourCount(h);
    }
    expect(line.mean[0]).toBeCloseTo(fs / fn, 9);
  });

  it("30 days come in 6-hour buckets from the rollups, not the raw readings", async () => {
    const a = await getZoneSeries(farm.zones.working!, q(END - 30 * DAY, END));
    expect(a).toMatchObject({ source: "rollup", bucketSeconds: 21_600 });
    const line = a.series[0]!;
    expect(line.t.length).toBe(121);
    expect(END - line.t.at(-1)! * 1000).toBeLessThan(6 * HOUR);
    // No raw reading exists for this probe at all, so every point came from the rollups.
    const raw = await c.query(`select count(*)::int as n from readings where probe_id = $1`, [farm.probes[2]!.id]);
    expect(raw.rows[0].n).toBe(0);
  });

  it("day buckets are cut at the farm's own midnight", async () => {
    const a = await getZoneSeries(newYork.zones.working!, q(END - YEAR, END));
    const hourIn = new Intl.DateTimeFormat("en-GB", { timeZone: "America/New_York", hour: "2-digit", minute: "2-digit", hourCycle: "h23" });
    const starts = a.series[0]!.t;
    expect(starts.length).toBeGreaterThan(360);
    expect(new Set(starts.map((t) => hourIn.format(new Date(t * 1000))))).toEqual(new Set(["00:00"]));
    // New York is off UTC by 4 or 5 hours, so these are not UTC midnights.
    expect(starts.some((t) => (t * 1000) % DAY === 0)).toBe(false);
  });
});

describe("logbook marks and the bin's series", () => {
  let ids: Record<string, string>;
  beforeAll(async () => {
    const at = (msAgo: number) => new Date(END - msAgo).toISOString();
    const one = async (sql: string, args: unknown[]) => (await c.query(sql, args)).rows[0].id as string;
    const { farmId, binId, zones } = farm;
    ids = {
      feeding: await one(`insert into feedings (farm_id, bin_id, zone_id, at, total_kg) values ($1, $2, $3, $4, 1.5) returning id`, [
        farmId,
        binId,
        zones.fresh,
        at(20 * DAY),
      ]),
      watering: await one(`insert into waterings (farm_id, bin_id, zone_id, at, litres) values ($1, $2, null, $3, 4) returning id`, [
        farmId,
        binId,
        at(3 * DAY),
      ]),
      shift: await one(`insert into shifts (farm_id, bin_id, zone_id, to_zone_id, at, volume_l) values ($1, $2, $3, $4, $5, 10) returning id`, [
        farmId,
        binId,
        zones.working,
        zones.fresh,
        at(100 * DAY),
      ]),
      harvest: await one(`insert into harvests (farm_id, bin_id, zone_id, at, mass_kg, volume_l) values ($1, $2, $3, $4, 6.2, 9) returning id`, [
        farmId,
        binId,
        zones.curing,
        at(200 * DAY),
      ]),
      old: await one(`insert into feedings (farm_id, bin_id, zone_id, at, total_kg) values ($1, $2, $3, $4, 2) returning id`, [
        farmId,
        binId,
        zones.fresh,
        at(400 * DAY),
      ]),
    };
  });

  it("a zone's series brings its own entries, the whole bin's and shifts into it, in the range only", async () => {
    const year = await getZoneSeries(farm.zones.fresh!, q(END - YEAR, END));
    expect(year.events!.map((e) => [e.kind, e.id])).toEqual([
      ["shift", ids.shift],
      ["feeding", ids.feeding],
      ["watering", ids.watering],
    ]);
    expect(year.events!.find((e) => e.kind === "feeding")).toMatchObject({ massKg: 1.5, zoneId: farm.zones.fresh });
    expect(year.events!.find((e) => e.kind === "shift")).toMatchObject({ zoneId: farm.zones.working, toZoneId: farm.zones.fresh, volumeL: 10 });
    expect(year.events!.find((e) => e.kind === "watering")).toMatchObject({ litres: 4, zoneId: null });
    // A week holds the watering alone; the curing zone sees its harvest and the whole-bin watering.
    const week = await getZoneSeries(farm.zones.fresh!, q(END - 7 * DAY, END));
    expect(week.events!.map((e) => e.kind)).toEqual(["watering"]);
    const curing = await getZoneSeries(farm.zones.curing!, q(END - YEAR, END));
    expect(curing.events!.map((e) => e.kind)).toEqual(["harvest", "watering"]);
    expect(curing.events![0]).toMatchObject({ massKg: 6.2, volumeL: 9 });
  });

  it("a bin's series has one line per zone, its probes merged, and every entry of the range", async () => {
    const a = await getBinSeries(farm.binId, q(END - YEAR, END));
    expect(a).toMatchObject({ source: "rollup", bucketSeconds: 86_400, species: "eisenia-fetida" });
    expect(a.zones.map((z) => [z.zoneId, z.kind])).toEqual([
      [farm.zones.fresh, "fresh"],
      [farm.zones.working, "working"],
      [farm.zones.curing, "curing"],
    ]);
    const [fresh, working, curing] = a.zones;
    expect(fresh!.t.length).toBe(366);
    expect(working!.t.length).toBe(366);
    expect(curing!.t).toEqual([]);
    // Fresh merges its two probes (the second 2 °C warmer, same counts): its means sit 1 °C above
    // the first probe's alone.
    const single = await getZoneSeries(farm.zones.fresh!, q(END - YEAR, END));
    const first = single.series.find((s) => s.probeId === farm.probes[0]!.id)!;
    expect(fresh!.mean[150]! - first.mean[150]!).toBeCloseTo(1, 9);
    expect(fresh!.max[150]! - first.max[150]!).toBeCloseTo(2, 9);
    expect(a.events.map((e) => e.kind)).toEqual(["harvest", "shift", "feeding", "watering"]);
  });

  it("a bin's short range is bucketed from raw readings, at least 5 minutes a point", async () => {
    const rows = [];
    for (let t = END - 6 * HOUR; t < END; t += 60_000) rows.push(`(${farm.probes[2]!.id}, 'moisture', to_timestamp(${t / 1000}), 70)`);
    await c.query(`insert into readings (probe_id, metric, ts, value) values ${rows.join(",")}`);
    const a = await getBinSeries(farm.binId, q(END - 6 * HOUR, END, "moisture"));
    expect(a).toMatchObject({ source: "raw", bucketSeconds: 300 });
    expect(a.zones[1]!.t.length).toBe(72);
    expect(a.zones[0]!.t).toEqual([]);
  });
});
