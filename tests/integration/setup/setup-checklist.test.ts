// The setup checklist on Today ticks each step from the farm's own rows, shows each role what it
// can do, and is gone when all is done. Against the worker's PostgreSQL, through the use cases.
import { randomBytes } from "node:crypto";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db";
import { insertReadings } from "@/db/queries/readings";
import { addBin } from "@/lib/server/bins/add-bin";
import { registerProbe } from "@/lib/server/probes/register";
import { readSetupChecklist, type SetupChecklist } from "@/lib/server/farms/setup-checklist";
import type { Role } from "@/lib/domain/vocabulary";

let c: pg.Client;
const uniq = () => randomBytes(4).toString("hex");

beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
});
afterAll(async () => {
  await c.end();
  await closeDb();
});

async function person(name: string) {
  const u = await c.query(`insert into users (email, name, password_hash) values ($1, $2, 'x') returning id`, [`${name}-${uniq()}@example.org`, name]);
  return u.rows[0].id as string;
}
async function newFarm() {
  const f = await c.query(`insert into farms (name, timezone) values ($1, 'UTC') returning id`, [`Setup farm ${uniq()}`]);
  const farmId = f.rows[0].id as string;
  const owner = await person("owner");
  await c.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'owner')`, [owner, farmId]);
  return { farmId, owner };
}
async function join(farmId: string, role: Role) {
  const id = await person(role);
  await c.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, $3)`, [id, farmId, role]);
  return id;
}
const subscribe = (userId: string) =>
  c.query(`insert into push_subscriptions (user_id, endpoint, p256dh, auth) values ($1, $2, 'p', 'a')`, [userId, `https://push.example/${uniq()}`]);
const ticks = (list: SetupChecklist | null) => Object.fromEntries((list?.steps ?? []).map((s) => [s.step, s.done]));
const who = (farmId: string, userId: string, role: Role) => ({ farmId, userId, role, units: "metric" as const });

describe("the setup checklist", () => {
  it("ticks each step from the data, in order, and is gone when all are done", async () => {
    const { farmId, owner } = await newFarm();
    const me = who(farmId, owner, "owner");

    // An empty farm: all five steps, none done.
    let list = await readSetupChecklist(me);
    expect(list?.steps.map((s) => s.step)).toEqual(["bin", "probe", "reading", "alerts", "crew"]);
    expect(ticks(list)).toEqual({ bin: false, probe: false, reading: false, alerts: false, crew: false });
    expect(list?.farmReady).toBe(false);

    const { bin } = await addBin(me, { name: "Porch tote", style: "tote", species: "eisenia-fetida", zoneCount: 3 });
    list = await readSetupChecklist(me);
    expect(ticks(list)).toEqual({ bin: true, probe: false, reading: false, alerts: false, crew: false });

    const { probe } = await registerProbe(me, { code: `set-${uniq()}`, zoneId: bin.zones[0]!.id, metrics: ["temperature"], reportIntervalS: 60 });
    list = await readSetupChecklist(me);
    expect(ticks(list)).toEqual({ bin: true, probe: true, reading: false, alerts: false, crew: false });
    // "See its first reading" leads to that probe's page.
    expect(list?.newestProbeId).toBe(probe.id);

    await insertReadings([{ probeId: probe.id, metric: "temperature", ts: new Date(), value: 21.5 }]);
    list = await readSetupChecklist(me);
    expect(ticks(list)).toEqual({ bin: true, probe: true, reading: true, alerts: false, crew: false });
    expect(list?.farmReady).toBe(true);

    await subscribe(owner);
    list = await readSetupChecklist(me);
    expect(ticks(list)).toEqual({ bin: true, probe: true, reading: true, alerts: true, crew: false });

    await c.query(`insert into invitations (farm_id, email, role, token_hash, expires_at) values ($1, $2, 'keeper', $3, now() + interval '7 days')`, [
      farmId,
      `crew-${uniq()}@example.org`,
      uniq(),
    ]);
    expect(await readSetupChecklist(me)).toBeNull();
  });

  it("a second member ticks 'invite the crew' as an invitation does", async () => {
    const { farmId, owner } = await newFarm();
    expect(ticks(await readSetupChecklist(who(farmId, owner, "owner"))).crew).toBe(false);
    await join(farmId, "viewer");
    expect(ticks(await readSetupChecklist(who(farmId, owner, "owner"))).crew).toBe(true);
  });

  it("an archived bin or probe does not count, and another farm's rows never tick this one", async () => {
    const { farmId, owner } = await newFarm();
    const other = await newFarm();
    const me = who(farmId, owner, "owner");
    const { bin } = await addBin(me, { name: "Old tote", style: "tote", species: "eisenia-fetida", zoneCount: 1 });
    await c.query(`update bins set archived_at = now() where id = $1`, [bin.id]);
    // The other farm has everything.
    const theirs = who(other.farmId, other.owner, "owner");
    const { bin: b2 } = await addBin(theirs, { name: "Their bin", style: "bed", species: "eisenia-fetida", zoneCount: 2 });
    const { probe } = await registerProbe(theirs, { code: `oth-${uniq()}`, zoneId: b2.zones[0]!.id, metrics: ["temperature"], reportIntervalS: 60 });
    await insertReadings([{ probeId: probe.id, metric: "temperature", ts: new Date(), value: 20 }]);
    await join(other.farmId, "keeper");
    expect(ticks(await readSetupChecklist(me))).toEqual({ bin: false, probe: false, reading: false, alerts: false, crew: false });
  });

  it("a keeper sees only alerts on this phone and a note while the owner sets up; a viewer only the note", async () => {
    const { farmId, owner } = await newFarm();
    const keeper = await join(farmId, "keeper");
    const viewer = await join(farmId, "viewer");

    const k = await readSetupChecklist(who(farmId, keeper, "keeper"));
    expect(k?.steps).toEqual([{ step: "alerts", done: false }]);
    expect(k?.farmReady).toBe(false);
    const v = await readSetupChecklist(who(farmId, viewer, "viewer"));
    expect(v?.steps).toEqual([]);
    expect(v?.farmReady).toBe(false);

    // The keeper's own phone ticks the keeper's step, not the owner's.
    await subscribe(keeper);
    expect((await readSetupChecklist(who(farmId, keeper, "keeper")))?.steps).toEqual([{ step: "alerts", done: true }]);
    expect(ticks(await readSetupChecklist(who(farmId, owner, "owner"))).alerts).toBe(false);

    // Once the farm has a bin, a probe and a reading, the keeper (push on) and the viewer see nothing.
    const me = who(farmId, owner, "owner");
    const { bin } = await addBin(me, { name: "Shed bed", style: "bed", species: "eisenia-fetida", zoneCount: 2 });
    const { probe } = await registerProbe(me, { code: `kv-${uniq()}`, zoneId: bin.zones[0]!.id, metrics: ["temperature"], reportIntervalS: 60 });
    await insertReadings([{ probeId: probe.id, metric: "temperature", ts: new Date(), value: 22 }]);
    expect(await readSetupChecklist(who(farmId, keeper, "keeper"))).toBeNull();
    expect(await readSetupChecklist(who(farmId, viewer, "viewer"))).toBeNull();
    // The owner still has a step of their own to go.
    expect(ticks(await readSetupChecklist(me))).toEqual({ bin: true, probe: true, reading: true, alerts: false, crew: true });
  });
});
