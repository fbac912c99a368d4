// A year's chart reads the daily rollups the deferred refresh makes (and the hourly rollups for the
// days it has not done), and answers exactly what the hourly rollups alone give: after the refresh,
// after late readings, after an import of old ones and after the farm's time zone changes.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db";
import { markDailyRollupsStale } from "@/db/queries/daily-rollups";
import { insertReadings, type ReadingInput } from "@/db/queries/readings";
import { listDailyPoints, listRollupPoints, type SeriesPoint, type SeriesRange } from "@/db/queries/series";
import { seriesQuery } from "@/lib/domain/validation/series";
import { runSeriesMaintenance } from "@/lib/server/series/maintenance";
import { getZoneSeries } from "@/lib/server/series/zone-series";
import { makeFarm, type TestFarm } from "./fixtures";

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const now = new Date();
const END = Math.floor(now.getTime() / 60_000) * 60_000;
let c: pg.Client;
let farm: TestFarm;
let ids: number[];
const range: SeriesRange = { metric: "temperature", from: new Date(END - 365 * DAY), to: new Date(END) };
const valueAt = (t: number, i: number) => 15 + i + 5 * Math.sin(t / (9 * HOUR)) + ((t / 60_000) % 11) / 10;

async function same(tz: string) {
  const [daily, hourly] = await Promise.all([listDailyPoints(ids, range, tz), listRollupPoints(ids, range, 86_400, { timezone: tz })]);
  const norm = (rows: SeriesPoint[]) =>
    rows.map((r) => ({ key: r.key, t: new Date(r.t).toISOString(), mean: Number(r.mean), min: Number(r.min), max: Number(r.max) }));
  const a = norm(daily);
  const b = norm(hourly);
  expect(a.map((r) => [r.key, r.t])).toEqual(b.map((r) => [r.key, r.t]));
  for (const [i, r] of a.entries()) {
    expect(r.mean).toBeCloseTo(b[i]!.mean, 9);
    expect(r.min).toBe(b[i]!.min);
    expect(r.max).toBe(b[i]!.max);
  }
  return a.length;
}

const dailyRows = async () => (await c.query(`select count(*)::int as n from reading_daily_rollups where probe_id = any($1)`, [ids])).rows[0].n as number;

beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
  // A farm through a clock change (New York leaves daylight time in early November).
  farm = await makeFarm(c, { zones: ["working"], probes: ["working", "working"], timezone: "America/New_York" });
  ids = farm.probes.map((p) => p.id);
  const rows: ReadingInput[] = [];
  for (const [i, id] of ids.entries())
    for (let t = END - 130 * DAY; t < END; t += 20 * 60_000) rows.push({ probeId: id, metric: "temperature", ts: new Date(t), value: valueAt(t, i) });
  for (let i = 0; i < rows.length; i += 5000) await insertReadings(rows.slice(i, i + 5000));
});

afterAll(async () => {
  await c.end();
  await closeDb();
});

describe("daily rollups for a year's chart", () => {
  it("before any refresh the days come from the hourly rollups", async () => {
    expect(await dailyRows()).toBe(0);
    expect(await same("America/New_York")).toBeGreaterThan(2 * 129);
  });

  it("after the refresh the finished days come from the daily rollups, with the same answer", async () => {
    await runSeriesMaintenance({ retentionMonths: null });
    // Every farm day before today's, for both probes (131 days touched, the first one in part).
    const n = await dailyRows();
    expect(n).toBeGreaterThanOrEqual(2 * 130);
    expect(n).toBeLessThanOrEqual(2 * 132);
    const state = await c.query(`select timezone, done_through from reading_daily_state where probe_id = any($1)`, [ids]);
    const midnight = (await c.query(`select date_trunc('day', now(), 'America/New_York') as m`)).rows[0].m as Date;
    expect(state.rows).toEqual(ids.map(() => ({ timezone: "America/New_York", done_through: midnight })));
    await same("America/New_York");
    // The days really come from reading_daily_rollups: a changed row shows in the answer.
    const day = (await c.query(`select day, max from reading_daily_rollups where probe_id = $1 order by day limit 1 offset 10`, [ids[0]])).rows[0];
    await c.query(`update reading_daily_rollups set max = 1000 where probe_id = $1 and metric = 'temperature' and day = $2`, [ids[0], day.day]);
    const seen = await listDailyPoints(ids, range, "America/New_York");
    await c.query(`update reading_daily_rollups set max = $3 where probe_id = $1 and metric = 'temperature' and day = $2`, [ids[0], day.day, day.max]);
    expect(seen.find((r) => r.key === String(ids[0]) && new Date(r.t).getTime() === day.day.getTime())!.max).toBe(1000);
    const a = await getZoneSeries(
      farm.zones.working!,
      seriesQuery.parse({ metric: "temperature", from: range.from.toISOString(), to: range.to.toISOString() }),
    );
    expect(a.bucketSeconds).toBe(86_400);
    expect(a.series.find((s) => s.probeId === ids[0])!.t.length).toBeGreaterThanOrEqual(130);
  });

  it("late readings of yesterday are taken in by the next refresh", async () => {
    const t = END - DAY - 7 * 60_000;
    await insertReadings([{ probeId: ids[0]!, metric: "temperature", ts: new Date(t), value: 99 }]);
    await runSeriesMaintenance({ retentionMonths: null });
    await same("America/New_York");
    const max = await c.query(`select max(max) as m from reading_daily_rollups where probe_id = $1`, [ids[0]]);
    expect(max.rows[0].m).toBe(99);
  });

  it("an import of older readings marks the days stale: hourly until the refresh, then daily again", async () => {
    const t = END - 40 * DAY - 7 * 60_000;
    await insertReadings([{ probeId: ids[1]!, metric: "temperature", ts: new Date(t), value: -5 }]);
    await markDailyRollupsStale([ids[1]!], new Date(t));
    await same("America/New_York");
    await runSeriesMaintenance({ retentionMonths: null });
    await same("America/New_York");
    const min = await c.query(`select min(min) as m from reading_daily_rollups where probe_id = $1`, [ids[1]]);
    expect(min.rows[0].m).toBe(-5);
  });

  it("a farm that changes its time zone gets its days cut again at its new midnight", async () => {
    await c.query(`update farms set timezone = 'Asia/Kolkata' where id = $1`, [farm.farmId]);
    await same("Asia/Kolkata");
    await runSeriesMaintenance({ retentionMonths: null });
    const tz = await c.query(`select distinct timezone from reading_daily_state where probe_id = any($1)`, [ids]);
    expect(tz.rows).toEqual([{ timezone: "Asia/Kolkata" }]);
    expect(await dailyRows()).toBeGreaterThanOrEqual(2 * 130);
    await same("Asia/Kolkata");
  });
});
