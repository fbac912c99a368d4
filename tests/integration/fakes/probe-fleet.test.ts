// The simulated fleet against the real ingest broker and the worker's PostgreSQL.
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import pg from "pg";
import { buildPack, startFleet, type Fleet } from "@/fakes/probe-fleet";
import { startIngest, type Ingest } from "@/ingest/service";
import { closeDb } from "@/db";
import { parseSenml } from "@/lib/domain/senml";
import { readingFromRecord } from "@/lib/domain/metrics";
import { makeFarm, until, type TestFarm } from "../series/fixtures";

let c: pg.Client;
let ingest: Ingest | null = null;
let fleet: Fleet | null = null;

const fleetProbes = (f: TestFarm) => f.probes.map((p) => ({ code: p.code, token: p.token, zone: p.zone }));
const count = async (sql: string, params: unknown[]) => Number(Object.values((await c.query(sql, params)).rows[0])[0]);
const temps = async (probeId: number) =>
  (await c.query(`select value from readings where probe_id = $1 and metric = 'temperature' order by ts`, [probeId])).rows.map((r) => r.value as number);

beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
});

afterEach(async () => {
  await fleet?.stop();
  fleet = null;
  await ingest?.close();
  ingest = null;
});

afterAll(async () => {
  await c.end();
  await closeDb();
});

describe("the simulated probe fleet", () => {
  it("builds packs that lib/domain/senml.ts resolves to our names and units without a refusal", () => {
    const at = Date.parse("2025-05-01T12:00:00Z");
    const pack = buildPack("alder-01", at, { temperature: 22.456, moisture: 78.04, ammonia: 2.1, batteryV: 3.9, signalDbm: -67.4, firmware: "ww-0.4.2" });
    const parsed = parseSenml(JSON.stringify(pack), { now: at / 1000 });
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.errors).toEqual([]);
    const readings = parsed.records.map((r) => readingFromRecord(r));
    expect(readings.map((r) => (r.ok ? [r.reading.metric, r.reading.value ?? r.reading.text, r.reading.time] : r.reason))).toEqual([
      ["temperature", 22.46, at / 1000],
      ["moisture", 78, at / 1000],
      ["ammonia", 2.1, at / 1000],
      ["battery-voltage", 3.9, at / 1000],
      ["signal", -67, at / 1000],
      ["firmware", "ww-0.4.2", at / 1000],
    ]);
  });

  it("publishes readings the ingest stores, with battery, signal and firmware on the probe", async () => {
    const farm = await makeFarm(c);
    ingest = await startIngest({ port: 0 });
    fleet = await startFleet({ probes: fleetProbes(farm), port: ingest.port, intervalMs: 150, controlPort: null, seed: 7, reconnectPeriodMs: 200 });
    await fleet.ready();
    await until("12 acknowledged messages", () => fleet!.sent() >= 12);
    await fleet.stop();
    const ids = farm.probes.map((p) => p.id);
    const byMetric = await c.query(`select metric::text, count(*)::int as n from readings where probe_id = any($1) group by 1 order by 1`, [ids]);
    const n = Object.fromEntries(byMetric.rows.map((r) => [r.metric, r.n as number]));
    expect(n.temperature).toBe(fleet.sent());
    expect(n.moisture).toBe(fleet.sent());
    expect(n["battery-voltage"]).toBeGreaterThanOrEqual(3);
    expect(n.signal).toBeGreaterThanOrEqual(3);
    expect(await count(`select count(*) from rejected_messages where probe_id = any($1)`, [ids])).toBe(0);
    const rows = (await c.query(`select code, firmware, battery_v, signal_dbm, last_seen_at from probes where id = any($1)`, [ids])).rows;
    for (const r of rows) {
      expect(r.firmware, r.code).toBe("ww-0.4.2");
      expect(r.battery_v).toBeGreaterThan(3.3);
      expect(r.signal_dbm).toBeLessThan(-30);
      expect(Date.now() - new Date(r.last_seen_at).getTime()).toBeLessThan(30_000);
    }
    // Temperatures sit in each zone's band (fresh warmest), inside a day's swing and noise.
    const fresh = await temps(farm.probes[0]!.id);
    const curing = await temps(farm.probes[2]!.id);
    for (const t of fresh) {
      expect(t).toBeGreaterThan(21.5);
      expect(t).toBeLessThan(24.5);
    }
    for (const t of curing) {
      expect(t).toBeGreaterThan(18.5);
      expect(t).toBeLessThan(21.5);
    }
  });

  it("keeps unacknowledged messages while the broker is away and resends them: none lost, none doubled", async () => {
    const farm = await makeFarm(c, { zones: ["working"], probes: ["working", "working"] });
    ingest = await startIngest({ port: 0 });
    const port = ingest.port;
    fleet = await startFleet({ probes: fleetProbes(farm), port, intervalMs: 100, controlPort: null, reconnectPeriodMs: 200 });
    await fleet.ready();
    await until("some messages stored", () => fleet!.sent() >= 6);
    await ingest.close();
    ingest = null;
    await until("messages held while the broker is away", () => fleet!.pending() >= 6);
    const heldWhileAway = fleet.pending();
    ingest = await startIngest({ port });
    await until("everything held is acknowledged", () => fleet!.pending() === 0 && fleet!.sent() >= 20, 20_000);
    await fleet.stop();
    const ids = farm.probes.map((p) => p.id);
    // Every data message carries one temperature with its own time: rows = messages acknowledged.
    expect(heldWhileAway).toBeGreaterThanOrEqual(6);
    expect(await count(`select count(*) from readings where probe_id = any($1) and metric = 'temperature'`, [ids])).toBe(fleet.sent());
  });

  it("a heavy feed started through the control endpoint heats the zone about 2 °C per simulated hour", async () => {
    const farm = await makeFarm(c, { zones: ["fresh", "curing"] });
    ingest = await startIngest({ port: 0 });
    // 3600× speed: a simulated hour per real second, so 4 ticks of 250 ms are one hour.
    fleet = await startFleet({ probes: fleetProbes(farm), port: ingest.port, intervalMs: 250, speed: 3600, controlPort: 0, seed: 3, reconnectPeriodMs: 200 });
    await fleet.ready();
    const [fresh, curing] = farm.probes as [TestFarm["probes"][0], TestFarm["probes"][0]];
    await until("a first reading of each probe", async () => (await temps(fresh.id)).length > 0 && (await temps(curing.id)).length > 0);
    const base = { fresh: await temps(fresh.id), curing: await temps(curing.id) };
    const before = { fresh: base.fresh.at(-1)!, curing: base.curing.at(-1)! };
    const res = await fetch(`${fleet.controlUrl}/scenario`, { method: "POST", body: JSON.stringify({ code: fresh.code, scenario: "heavy-feed" }) });
    expect(res.status).toBe(200);

    // Eight messages later (a quarter of a simulated hour each): about +0.5 °C per message in the
    // fresh zone (one message in flight at the trigger may carry no heat), only noise in the curing zone.
    await until("eight readings of the heating", async () => (await temps(fresh.id)).length >= base.fresh.length + 8);
    const heated = await temps(fresh.id);
    const k = heated.length - base.fresh.length;
    const perSimHour = (heated.at(-1)! - before.fresh) / (k * 0.25);
    expect(perSimHour).toBeGreaterThan(1.5);
    expect(perSimHour).toBeLessThan(2.5);
    expect(Math.abs((await temps(curing.id)).at(-1)! - before.curing)).toBeLessThan(0.6);
    const state = (await (await fetch(`${fleet.controlUrl}/probes`)).json()) as { probes: { code: string; scenario: string }[] };
    expect(state.probes.find((p) => p.code === fresh.code)?.scenario).toBe("heavy-feed");
  });

  it("a probe in dropout goes silent and its connection ends while the others keep reporting, then comes back", async () => {
    const farm = await makeFarm(c, { zones: ["working"], probes: ["working", "working"] });
    ingest = await startIngest({ port: 0 });
    fleet = await startFleet({ probes: fleetProbes(farm), port: ingest.port, intervalMs: 100, controlPort: null, reconnectPeriodMs: 200 });
    await fleet.ready();
    const [gone, stays] = farm.probes as [TestFarm["probes"][0], TestFarm["probes"][0]];
    await until(
      "both probes connected",
      async () => (await c.query(`select bool_and(online) as on from probes where id = any($1)`, [[gone.id, stays.id]])).rows[0].on === true,
    );
    fleet.trigger(gone.code, "dropout");
    await until(
      "the dropped probe marked as not connected",
      async () => (await c.query(`select online from probes where id = $1`, [gone.id])).rows[0].online === false,
    );
    const n = async (id: number) => count(`select count(*) from readings where probe_id = $1`, [id]);
    const silentFrom = await n(gone.id);
    const othersFrom = await n(stays.id);
    await new Promise((r) => setTimeout(r, 800));
    expect(await n(gone.id)).toBe(silentFrom);
    expect(await n(stays.id)).toBeGreaterThan(othersFrom);

    fleet.trigger(gone.code, "steady");
    await until("the probe reports again", async () => (await n(gone.id)) > silentFrom);
    expect((await c.query(`select online from probes where id = $1`, [gone.id])).rows[0].online).toBe(true);
    // Its birth message ("here" on wormward/<code>/presence) and its will ("gone") were our words: none refused.
    expect(await count(`select count(*) from rejected_messages where probe_id = any($1)`, [[gone.id, stays.id]])).toBe(0);
  });
});
