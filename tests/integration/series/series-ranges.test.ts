// The series queries against the worker's PostgreSQL: raw readings for short ranges, date_bin
// buckets when raw would exceed ~1,000 points, hourly rollups merged into 1-hour, 6-hour or 1-day
// buckets for long ranges.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db";
import { insertReadings } from "@/db/queries/readings";
import { getProbeSeries } from "@/lib/server/series/probe-series";
import { MAX_POINTS } from "@/lib/server/series/read-series";
import { getZoneSeries } from "@/lib/server/series/zone-series";
import { seriesQuery } from "@/lib/domain/validation/series";
import { makeFarm, type TestFarm } from "./fixtures";

let c: pg.Client;
let farm: TestFarm;
const HOUR = 3_600_000;
// A fixed "now" on an hour boundary, so expected buckets can be computed here independently.
const END = Date.UTC(2025, 5, 1, 0, 0, 0);
const temperatureAt = (t: number, probe: number) => 20 + 2 * Math.sin(t / (6 * HOUR)) + probe + ((t / 60_000) % 7) / 10;

beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
  farm = await makeFarm(c, { zones: ["fresh", "curing"], probes: ["fresh", "fresh", "curing"] });
  // 90 days at one reading per 5 min for the first probe (through the ingest's own insert, which
  // keeps the hourly rollups), the last 2 days at one per minute for both fresh probes.
  const rows: { probeId: number; metric: "temperature"; ts: Date; value: number }[] = [];
  for (let t = END - 90 * 24 * HOUR; t < END; t += 5 * 60_000)
    rows.push({ probeId: farm.probes[0]!.id, metric: "temperature", ts: new Date(t), value: temperatureAt(t, 0) });
  for (const [i, p] of farm.probes.slice(0, 2).entries()) {
    for (let t = END - 48 * HOUR; t < END; t += 60_000) rows.push({ probeId: p.id, metric: "temperature", ts: new Date(t), value: temperatureAt(t, i) });
  }
  for (let i = 0; i < rows.length; i += 5000) await insertReadings(rows.slice(i, i + 5000));
});

afterAll(async () => {
  await c.end();
  await closeDb();
});

const q = (fromMs: number, toMs: number) =>
  seriesQuery.parse({ metric: "temperature", from: new Date(fromMs).toISOString(), to: new Date(toMs).toISOString() });
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;

describe("series for charts", () => {
  it("a 90-day range is answered from hourly rollups in 6-hour buckets", async () => {
    const a = await getZoneSeries(farm.zones.fresh!, q(END - 90 * 24 * HOUR, END));
    expect(a.source).toBe("rollup");
    expect(a.bucketSeconds).toBe(6 * 3600);
    const line = a.series.find((s) => s.probeId === farm.probes[0]!.id)!;
    expect(line.t.length).toBeLessThanOrEqual(MAX_POINTS);
    expect(line.t.length).toBe(360);
    // Each 6-h point is the mean, min and max of the 72 readings inside it.
    const start = line.t[100]! * 1000;
    expect(start % (6 * HOUR)).toBe(0);
    const inside: number[] = [];
    for (let t = start; t < start + 6 * HOUR; t += 5 * 60_000) inside.push(temperatureAt(t, 0));
    expect(line.mean[100]).toBeCloseTo(mean(inside), 9);
    expect(line.min[100]).toBeCloseTo(Math.min(...inside), 9);
    expect(line.max[100]).toBeCloseTo(Math.max(...inside), 9);

    // It really reads the rollups: a changed rollup row shows, the raw readings do not.
    await c.query(`update reading_rollups set min = -40 where probe_id = $1 and metric = 'temperature' and hour = to_timestamp($2)`, [
      farm.probes[0]!.id,
      line.t[100]!,
    ]);
    const b = await getZoneSeries(farm.zones.fresh!, q(END - 90 * 24 * HOUR, END));
    expect(b.series.find((s) => s.probeId === farm.probes[0]!.id)!.min[100]).toBe(-40);
  });

  it("a 7-day range reads the rollups hour by hour, a 20-day range in 6-hour buckets", async () => {
    const week = await getProbeSeries(farm.probes[0]!.id, q(END - 7 * 24 * HOUR, END));
    expect(week).toMatchObject({ source: "rollup", bucketSeconds: 3600 });
    expect(week.series[0]!.t.length).toBe(168);
    const a = await getProbeSeries(farm.probes[0]!.id, q(END - 20 * 24 * HOUR, END));
    expect(a).toMatchObject({ source: "rollup", bucketSeconds: 6 * 3600 });
    expect(a!.series[0]!.t.length).toBe(80);
  });

  it("a short range is answered from raw readings, one point per reading", async () => {
    const a = await getProbeSeries(farm.probes[1]!.id, q(END - 6 * HOUR, END));
    expect(a).toMatchObject({ source: "raw", bucketSeconds: null, unit: "Cel", metric: "temperature" });
    const line = a!.series[0]!;
    expect(line.t.length).toBe(360);
    expect(line.t[0]).toBe((END - 6 * HOUR) / 1000);
    expect(line.mean[17]).toBeCloseTo(temperatureAt(line.t[17]! * 1000, 1), 9);
    expect(line.min[17]).toBe(line.mean[17]);
  });

  it("a raw range with more than 1,000 readings is bucketed so each series stays within 1,000 points", async () => {
    const a = await getZoneSeries(farm.zones.fresh!, q(END - 48 * HOUR, END));
    expect(a).toMatchObject({ source: "raw", bucketSeconds: 300 });
    expect(a.series.map((s) => s.code)).toEqual(
      farm.probes
        .slice(0, 2)
        .map((p) => p.code)
        .sort(),
    );
    for (const [i, p] of farm.probes.slice(0, 2).entries()) {
      const line = a.series.find((s) => s.probeId === p.id)!;
      expect(line.t.length).toBe(576);
      const start = line.t[40]! * 1000;
      // The first probe's 5-minute readings share their times with its 1-minute ones: stored once.
      const inside = Array.from({ length: 5 }, (_, k) => temperatureAt(start + k * 60_000, i));
      expect(line.mean[40]).toBeCloseTo(mean(inside), 9);
    }
  });

  it("a zone with no probes answers an empty list, and the curing probe with no readings an empty line", async () => {
    const a = await getZoneSeries(farm.zones.curing!, q(END - 6 * HOUR, END));
    expect(a.series).toEqual([{ probeId: farm.probes[2]!.id, code: farm.probes[2]!.code, label: null, t: [], mean: [], min: [], max: [] }]);
  });

  it("the query defaults to the last 24 hours and refuses ranges that make no sense, naming the field", () => {
    const d = seriesQuery.parse({ metric: "moisture" });
    expect(d.to.getTime() - d.from.getTime()).toBe(24 * HOUR);
    expect(Math.abs(d.to.getTime() - Date.now())).toBeLessThan(5000);
    const fields = (input: object) => {
      const r = seriesQuery.safeParse(input);
      return r.success ? null : r.error.issues.map((i) => i.path.join("."));
    };
    expect(fields({})).toEqual(["metric"]);
    expect(fields({ metric: "weight" })).toEqual(["metric"]);
    expect(fields({ metric: "temperature", from: "yesterday" })).toEqual(["from"]);
    expect(fields({ metric: "temperature", from: "2025-05-02T00:00:00Z", to: "2025-05-01T00:00:00Z" })).toEqual(["from"]);
    expect(fields({ metric: "temperature", from: "2023-01-01T00:00:00Z", to: "2025-01-01T00:00:00Z" })).toEqual(["from"]);
  });
});
