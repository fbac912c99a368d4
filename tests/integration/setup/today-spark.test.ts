// Today never says "no readings in the last 24 h" under a value it shows as live: each zone's
// sparkline ends at the zone's latest value, from the same probes.
import { randomBytes } from "node:crypto";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db";
import { insertReadings } from "@/db/queries/readings";
import { addBin } from "@/lib/server/bins/add-bin";
import { registerProbe } from "@/lib/server/probes/register";
import { readToday } from "@/lib/server/farms/read-today";

let c: pg.Client;
const uniq = () => randomBytes(4).toString("hex");
const MIN = 60_000;

beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
});
afterAll(async () => {
  await c.end();
  await closeDb();
});

async function farmWithProbe() {
  const f = await c.query(`insert into farms (name, timezone) values ($1, 'UTC') returning id`, [`Spark farm ${uniq()}`]);
  const who = { farmId: f.rows[0].id as string };
  const { bin } = await addBin(who, { name: "Tote", style: "tote", species: "eisenia-fetida", zoneCount: 1 });
  const zoneId = bin.zones[0]!.id;
  const { probe } = await registerProbe(who, { code: `sp-${uniq()}`, zoneId, metrics: ["temperature", "moisture"], reportIntervalS: 60 });
  return { who, zoneId, probeId: probe.id };
}
const zoneOf = async (who: { farmId: string }, zoneId: string) => (await readToday(who)).bins.flatMap((b) => b.zones).find((z) => z.id === zoneId)!;

describe("Today's latest value and its sparkline", () => {
  it("a probe's first reading gives a series of that one reading", async () => {
    const { who, zoneId, probeId } = await farmWithProbe();
    const ts = new Date(Date.now() - 2 * MIN);
    await insertReadings([{ probeId, metric: "temperature", ts, value: 23.4 }]);
    const z = await zoneOf(who, zoneId);
    expect(z.latest.temperature).toEqual({ ts: ts.toISOString(), value: 23.4 });
    // Before the fix this series held one 15-minute mean and the chart said "No readings in the last 24 h".
    // The board says "First reading in" for a one-point series; the chart's empty words need none.
    expect(z.spark.temperature).toEqual([[ts.toISOString(), 23.4]]);
    expect(z.spark.moisture).toEqual([]);
  });

  it("the series' last point is the latest reading, not the mean of its quarter hour", async () => {
    const { who, zoneId, probeId } = await farmWithProbe();
    // A quarter hour of readings climbing 1 °C a minute, and an hour before it.
    const now = Date.now();
    const rows = Array.from({ length: 10 }, (_, i) => ({ probeId, metric: "temperature" as const, ts: new Date(now - (9 - i) * MIN), value: 20 + i }));
    rows.push({ probeId, metric: "temperature", ts: new Date(now - 60 * MIN), value: 18 });
    await insertReadings(rows);
    const z = await zoneOf(who, zoneId);
    expect(z.latest.temperature?.value).toBe(29);
    expect(z.spark.temperature.at(-1)).toEqual([new Date(now).toISOString(), 29]);
    // The reading an hour before is its own quarter hour's point, ahead of the latest.
    expect(z.spark.temperature.length).toBeGreaterThanOrEqual(2);
    expect(z.spark.temperature[0]![1]).toBe(18);
    // Times only go forward along the line.
    const times = z.spark.temperature.map(([t]) => Date.parse(t));
    expect([...times].sort((a, b) => a - b)).toEqual(times);
  });

  it("a zone whose last reading is older than 24 h has no series, and an archived probe feeds neither", async () => {
    const { who, zoneId, probeId } = await farmWithProbe();
    await insertReadings([{ probeId, metric: "moisture", ts: new Date(Date.now() - 30 * 60 * MIN), value: 71 }]);
    let z = await zoneOf(who, zoneId);
    expect(z.latest.moisture?.value).toBe(71);
    expect(z.spark.moisture).toEqual([]);

    await insertReadings([{ probeId, metric: "temperature", ts: new Date(Date.now() - MIN), value: 24 }]);
    await c.query(`update probes set archived_at = now() where id = $1`, [probeId]);
    z = await zoneOf(who, zoneId);
    expect(z.latest.temperature).toBeUndefined();
    expect(z.spark.temperature).toEqual([]);
  });
});
