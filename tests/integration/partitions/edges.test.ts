// Readings across the edge of two month partitions: stored in each side's partition, a resent
// reading still ignored (the key holds the partition key), a chart over the edge sees both sides,
// and the series query's plan reads only the partitions its range overlaps.
import { sql } from "drizzle-orm";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db";
import { insertReadings, type ReadingInput } from "@/db/queries/readings";
import { bucketedReadingSql, probeLinePointsSql } from "@/db/queries/series";
import { seriesQuery } from "@/lib/domain/validation/series";
import { getZoneSeries } from "@/lib/server/series/zone-series";
import { makeFarm, type TestFarm } from "../series/fixtures";

const HOUR = 3_600_000;
const now = new Date();
// The first instant of last month (UTC): both sides of it are months the migration made.
const EDGE = Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1);
const valueAt = (t: number, i: number) => 18 + i + (t - EDGE) / HOUR / 10;
let c: pg.Client;
let farm: TestFarm;
let rows: ReadingInput[];

beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
  farm = await makeFarm(c, { zones: ["working"], probes: ["working", "working", "working"] });
  rows = [];
  for (const [i, p] of farm.probes.entries()) {
    for (let t = EDGE - 13 * HOUR; t < EDGE + 13 * HOUR; t += 60_000)
      rows.push({ probeId: p.id, metric: "temperature", ts: new Date(t), value: valueAt(t, i) });
  }
  expect((await insertReadings(rows)).inserted).toBe(rows.length);
});

afterAll(async () => {
  await c.end();
  await closeDb();
});

/** The readings partitions a statement's plan reads. */
async function partitionsRead(statement: ReturnType<typeof bucketedReadingSql>): Promise<string[]> {
  const r = await db().execute<{ "QUERY PLAN": unknown }>(sql`explain (format json) ${statement}`);
  const names = new Set<string>();
  const walk = (n: unknown) => {
    if (!n || typeof n !== "object") return;
    const o = n as Record<string, unknown>;
    if (typeof o["Relation Name"] === "string" && (o["Relation Name"] as string).startsWith("readings")) names.add(o["Relation Name"] as string);
    for (const v of Object.values(o)) if (typeof v === "object") walk(v);
  };
  walk(r.rows[0]!["QUERY PLAN"]);
  return [...names].sort();
}

describe("readings across a month edge", () => {
  it("stores each side in its own month's partition", async () => {
    const ids = farm.probes.map((p) => p.id);
    const r = await c.query<{ before: boolean; part: string; n: number }>(
      `select ts < $2 as before, tableoid::regclass::text as part, count(*)::int as n from readings where probe_id = any($1) group by 1, 2 order by 1`,
      [ids, new Date(EDGE).toISOString()],
    );
    expect(r.rows).toHaveLength(2);
    expect(r.rows[0]!.part).not.toBe(r.rows[1]!.part);
    expect(r.rows.every((x) => x.part !== "readings_default")).toBe(true);
    expect(r.rows.map((x) => x.n)).toEqual([13 * 60 * 3, 13 * 60 * 3]);
  });

  it("ignores the same readings sent again, on both sides, and counts them once in the rollups", async () => {
    const again = await insertReadings(rows.filter((_, i) => i % 7 === 0));
    expect(again.inserted).toBe(0);
    const r = await c.query(`select sum(count)::int as n from reading_rollups where probe_id = any($1)`, [farm.probes.map((p) => p.id)]);
    expect(r.rows[0].n).toBe(rows.length);
  });

  it("a 24-hour chart over the edge has the points of both months, each bucket's mean from its own readings", async () => {
    const q = seriesQuery.parse({ metric: "temperature", from: new Date(EDGE - 12 * HOUR).toISOString(), to: new Date(EDGE + 12 * HOUR).toISOString() });
    const a = await getZoneSeries(farm.zones.working!, q);
    expect(a.source).toBe("raw");
    const line = a.series.find((s) => s.probeId === farm.probes[1]!.id)!;
    const b = a.bucketSeconds! * 1000;
    expect(line.t[0]! * 1000).toBe(EDGE - 12 * HOUR);
    expect(line.t.at(-1)! * 1000).toBe(EDGE + 12 * HOUR - b);
    for (const start of [EDGE - b, EDGE]) {
      const k = line.t.indexOf(start / 1000);
      expect(k).toBeGreaterThan(-1);
      const inside: number[] = [];
      for (let t = start; t < start + b; t += 60_000) inside.push(valueAt(t, 1));
      expect(line.mean[k]).toBeCloseTo(inside.reduce((x, y) => x + y, 0) / inside.length, 9);
    }
  });

  it("the series query reads one partition for a day inside a month and two for a day over the edge", async () => {
    const ids = farm.probes.map((p) => p.id);
    const range = (from: number) => ({ metric: "temperature" as const, from: new Date(from), to: new Date(from + 24 * HOUR) });
    const inside = await partitionsRead(bucketedReadingSql(ids, range(EDGE + HOUR), 120));
    expect(inside).toHaveLength(1);
    const over = await partitionsRead(bucketedReadingSql(ids, range(EDGE - 12 * HOUR), 120));
    expect(over).toHaveLength(2);
    expect(over).toContain(inside[0]);
    // The last 24 hours, as a phone asks for them: this month's partition, and last month's only
    // when the day reaches over the first.
    const today = await partitionsRead(bucketedReadingSql(ids, range(now.getTime() - 24 * HOUR), 120));
    expect(today.length).toBeGreaterThanOrEqual(1);
    expect(today.length).toBeLessThanOrEqual(2);
    expect(today).not.toContain("readings_default");
    // A zone's chart reads its probes' lines in one statement: the same partitions.
    expect(await partitionsRead(probeLinePointsSql(ids, range(EDGE + HOUR), 1000, 120))).toEqual(inside);
    expect(await partitionsRead(probeLinePointsSql(ids, range(EDGE - 12 * HOUR), 1000, 120))).toEqual(over);
  });
});
