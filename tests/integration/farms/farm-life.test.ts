// Starting, leaving and deleting farms, and deleting an account, through the use cases against a
// real PostgreSQL: a farm always keeps an owner, and a deleted farm leaves no row behind.
import { randomBytes } from "node:crypto";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { AppError } from "@/lib/domain/errors";
import { authorize } from "@/lib/server/auth/authorize";
import { deleteFarm } from "@/lib/server/farms/delete-farm";
import { landingFarm } from "@/lib/server/farms/landing-farm";
import { LAST_OWNER_CANNOT_LEAVE, leaveFarm } from "@/lib/server/farms/leave-farm";
import { startFarm } from "@/lib/server/farms/start-farm";
import { deleteMyAccount, exportMyData } from "@/lib/server/people/my-data";
import { insertReadings } from "@/db/queries/readings";

let c: pg.Client;
beforeAll(async () => {
  c = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await c.connect();
});
afterAll(async () => {
  await c?.end();
});

const uniq = () => randomBytes(4).toString("hex");
const one = async (sql: string, params: unknown[] = []) => (await c.query(sql, params)).rows[0];

async function person(name: string, verified = true) {
  const r = await one(`insert into users (email, name, password_hash, email_verified_at) values ($1, $2, 'x', $3) returning id`, [
    `${name.toLowerCase()}-${uniq()}@example.org`,
    name,
    verified ? new Date() : null,
  ]);
  return r.id as string;
}
const join = (userId: string, farmId: string, role: string) =>
  c.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, $3)`, [userId, farmId, role]);
const start = (userId: string, name: string) => startFarm(userId, { name, unitSystem: "metric", timezone: "Europe/Dublin" });

// One row or more in every table that holds a farm's things, so the count before and after shows
// what deleting the farm removed.
async function fillFarm(farmId: string, userId: string) {
  const bin = (await one(`insert into bins (farm_id, name, style, species) values ($1, 'Bin', 'tote', 'eisenia-fetida') returning id`, [farmId])).id;
  const zone = (await one(`insert into zones (bin_id, position, kind) values ($1, 1, 'working') returning id`, [bin])).id;
  const probe = (await one(`insert into probes (farm_id, zone_id, code, token_hash) values ($1, $2, $3, 'h') returning id`, [farmId, zone, `p-${uniq()}`]))
    .id as number;
  await insertReadings([{ probeId: probe, metric: "temperature", ts: new Date(Date.now() - 60_000), value: 21 }] as never);
  await c.query(`insert into rejected_messages (farm_id, probe_id, source, reason) values ($1, $2, 'mqtt', 'bad record')`, [farmId, probe]);
  await c.query(`insert into rules (farm_id, kind) values ($1, 'heat')`, [farmId]);
  const alert = (
    await one(`insert into alerts (farm_id, bin_id, zone_id, kind, level, subject, message) values ($1, $2, $3, 'heat', 'act_now', $4, 'm') returning id`, [
      farmId,
      bin,
      zone,
      `s-${uniq()}`,
    ])
  ).id;
  await c.query(`insert into alert_events (alert_id, type, user_id) values ($1, 'raised', $2)`, [alert, userId]);
  await c.query(`insert into deliveries (dedupe_key, farm_id, alert_id, user_id, channel, reason) values ($1, $2, $3, $4, 'email', 'raised')`, [
    uniq(),
    farmId,
    alert,
    userId,
  ]);
  await c.query(`insert into ingredients (farm_id, key, name, kind, source) values ($1, $2, 'Straw', 'bedding', 'common practice')`, [farmId, `k-${uniq()}`]);
  const feeding = (await one(`insert into feedings (farm_id, bin_id, by_user_id) values ($1, $2, $3) returning id`, [farmId, bin, userId])).id;
  await c.query(`insert into feeding_items (feeding_id, name, mass_kg, moisture_pct) values ($1, 'scraps', 1, 80)`, [feeding]);
  await c.query(`insert into waterings (farm_id, bin_id, litres) values ($1, $2, 2)`, [farmId, bin]);
  await c.query(`insert into harvests (farm_id, bin_id, mass_kg) values ($1, $2, 3)`, [farmId, bin]);
  await c.query(`insert into log_notes (farm_id, bin_id, text) values ($1, $2, 'turned')`, [farmId, bin]);
  await c.query(`insert into oven_dry_samples (farm_id, bin_id, probe_id, wet_mass_g, dry_mass_g, moisture_wb_pct) values ($1, $2, $3, 100, 30, 70)`, [
    farmId,
    bin,
    probe,
  ]);
  await c.query(`insert into imports (farm_id, file_name, file_sha256) values ($1, 'a.csv', 'abc')`, [farmId]);
  await c.query(`insert into invitations (farm_id, email, role, token_hash, expires_at) values ($1, 'x@example.org', 'keeper', $2, now() + interval '1 day')`, [
    farmId,
    uniq(),
  ]);
}

// Rows of one farm, per table (readings and rollups through its probes).
async function countsOf(farmId: string) {
  const of = `(select id from probes where farm_id = $1)`;
  const bins = `(select id from bins where farm_id = $1)`;
  const alerts = `(select id from alerts where farm_id = $1)`;
  const q: Record<string, string> = {
    farms: `select count(*) from farms where id = $1`,
    memberships: `select count(*) from memberships where farm_id = $1`,
    invitations: `select count(*) from invitations where farm_id = $1`,
    bins: `select count(*) from bins where farm_id = $1`,
    zones: `select count(*) from zones where bin_id in ${bins}`,
    probes: `select count(*) from probes where farm_id = $1`,
    readings: `select count(*) from readings where probe_id in ${of}`,
    reading_rollups: `select count(*) from reading_rollups where probe_id in ${of}`,
    rejected_messages: `select count(*) from rejected_messages where farm_id = $1`,
    rules: `select count(*) from rules where farm_id = $1`,
    alerts: `select count(*) from alerts where farm_id = $1`,
    alert_events: `select count(*) from alert_events where alert_id in ${alerts}`,
    deliveries: `select count(*) from deliveries where farm_id = $1`,
    ingredients: `select count(*) from ingredients where farm_id = $1`,
    feedings: `select count(*) from feedings where farm_id = $1`,
    feeding_items: `select count(*) from feeding_items where feeding_id in (select id from feedings where farm_id = $1)`,
    waterings: `select count(*) from waterings where farm_id = $1`,
    harvests: `select count(*) from harvests where farm_id = $1`,
    log_notes: `select count(*) from log_notes where farm_id = $1`,
    oven_dry_samples: `select count(*) from oven_dry_samples where farm_id = $1`,
    imports: `select count(*) from imports where farm_id = $1`,
  };
  const out: Record<string, number> = {};
  for (const [t, sql] of Object.entries(q)) out[t] = Number((await one(sql, [farmId])).count);
  return out;
}
const totalRows = async () => Number((await one(`select count(*) from readings`)).count) + Number((await one(`select count(*) from rejected_messages`)).count);

const refusal = async (p: Promise<unknown>) => {
  const e = await p.then(
    () => null,
    (x: unknown) => x,
  );
  expect(e).toBeInstanceOf(AppError);
  return e as AppError;
};

describe("starting a farm", () => {
  it("the creator is its owner; an unconfirmed address is refused", async () => {
    const me = await person("Starter");
    const farm = await start(me, `Fresh farm ${uniq()}`);
    expect((await one(`select role from memberships where user_id = $1 and farm_id = $2`, [me, farm.id])).role).toBe("owner");
    expect(farm.timezone).toBe("Europe/Dublin");
    const unconfirmed = await person("Unconfirmed", false);
    expect((await refusal(start(unconfirmed, "Nope"))).code).toBe("forbidden");
  });

  it("the landing farm is the remembered one while the person is on it, else the first by name", async () => {
    const me = await person("Two-farmer");
    const a = await start(me, `Aaa ${uniq()}`);
    const z = await start(me, `Zzz ${uniq()}`);
    expect((await landingFarm(me, z.id))?.id).toBe(z.id);
    expect((await landingFarm(me, undefined))?.id).toBe(a.id);
    const stranger = await start(await person("Stranger"), `Other ${uniq()}`);
    expect((await landingFarm(me, stranger.id))?.id).toBe(a.id);
  });
});

describe("leaving a farm", () => {
  it("the last owner is refused with words saying to hand over first; nothing changes", async () => {
    const owner = await person("Lone owner");
    const farm = await start(owner, `Held farm ${uniq()}`);
    const keeper = await person("Keeper");
    await join(keeper, farm.id, "keeper");
    const e = await refusal(leaveFarm(owner, farm.id));
    expect(e.code).toBe("conflict");
    expect(e.message).toBe(LAST_OWNER_CANNOT_LEAVE);
    expect(e.message).toContain("make another member an owner");
    expect(Number((await one(`select count(*) from memberships where farm_id = $1`, [farm.id])).count)).toBe(2);
    // A keeper leaves; with a second owner the first may leave too.
    await leaveFarm(keeper, farm.id);
    const second = await person("Second owner");
    await join(second, farm.id, "owner");
    await leaveFarm(owner, farm.id);
    expect((await c.query(`select user_id from memberships where farm_id = $1`, [farm.id])).rows).toEqual([{ user_id: second }]);
  });

  it("two owners leaving at once leave the farm with one owner", async () => {
    const a = await person("Owner A");
    const farm = await start(a, `Race farm ${uniq()}`);
    const b = await person("Owner B");
    await join(b, farm.id, "owner");
    const results = await Promise.allSettled([leaveFarm(a, farm.id), leaveFarm(b, farm.id)]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    expect(Number((await one(`select count(*) from memberships where farm_id = $1 and role = 'owner'`, [farm.id])).count)).toBe(1);
  });

  it("a farm the person is not on answers not found", async () => {
    const farm = await start(await person("Someone"), `Not mine ${uniq()}`);
    expect((await refusal(leaveFarm(await person("Outsider"), farm.id))).code).toBe("not_found");
  });
});

describe("deleting a farm", () => {
  it("removes every row of the farm, counted per table, and no row of another farm", async () => {
    const owner = await person("Deleter");
    const farm = await start(owner, `Doomed farm ${uniq()}`);
    const other = await start(owner, `Kept farm ${uniq()}`);
    await fillFarm(farm.id, owner);
    await fillFarm(other.id, owner);
    const before = await countsOf(farm.id);
    const otherBefore = await countsOf(other.id);
    for (const [table, n] of Object.entries(before)) expect(n, table).toBeGreaterThan(0);
    const rowsBefore = await totalRows();

    const who = await authorize(owner, { farmId: farm.id }, "manage");
    const wrong = await refusal(deleteFarm(who, "doomed farm"));
    expect(wrong.field).toBe("confirm");
    expect(await countsOf(farm.id)).toEqual(before);

    await deleteFarm(who, ` ${farm.name} `);
    const after = await countsOf(farm.id);
    for (const [table, n] of Object.entries(after)) expect(n, table).toBe(0);
    expect(await countsOf(other.id)).toEqual(otherBefore);
    expect(await totalRows()).toBe(rowsBefore - before.readings! - before.rejected_messages!);
    // The people stay.
    expect((await one(`select count(*) from users where id = $1`, [owner])).count).toBe("1");
  });

  it("a keeper or viewer cannot delete the farm", async () => {
    const owner = await person("Owner");
    const farm = await start(owner, `Guarded farm ${uniq()}`);
    for (const role of ["keeper", "viewer"]) {
      const p = await person(role);
      await join(p, farm.id, role);
      expect((await refusal(authorize(p, { farmId: farm.id }, "manage").then((who) => deleteFarm(who, farm.name)))).code).toBe("forbidden");
    }
    expect((await refusal(authorize(await person("Stranger"), { farmId: farm.id }, "manage"))).code).toBe("not_found");
    expect((await one(`select count(*) from farms where id = $1`, [farm.id])).count).toBe("1");
  });
});

describe("my data", () => {
  it("the download holds my account and my owned farms' things, never a secret, and no other farm", async () => {
    const me = await person("Exporter");
    const mine = await start(me, `Mine ${uniq()}`);
    await fillFarm(mine.id, me);
    const elsewhere = await start(await person("Neighbour"), `Theirs ${uniq()}`);
    await join(me, elsewhere.id, "keeper");
    const data = await exportMyData(me);
    const text = JSON.stringify(data);
    expect(data.you).toMatchObject({ id: me, name: "Exporter" });
    expect(text).not.toContain("passwordHash");
    expect(text).not.toContain("tokenHash");
    expect(data.memberships.map((m) => m.farmId).sort()).toEqual([mine.id, elsewhere.id].sort());
    expect(data.farmsYouOwn.map((f) => f.farm?.id)).toEqual([mine.id]);
    const [farm] = data.farmsYouOwn;
    // Raw readings come as one export link per zone and month (this month here), beside the hourly rollups.
    expect(farm!.hourlyRollups).toHaveLength(1);
    expect(farm!.readingsDownloads).toHaveLength(1);
    expect(farm!.readingsDownloads[0]!.csv).toMatch(
      new RegExp(`^/api/farms/${mine.id}/readings/export\\?zoneId=[0-9a-f-]{36}&from=\\d{4}-\\d{2}-01&to=\\d{4}-\\d{2}-\\d{2}&format=csv$`),
    );
    expect(farm!.bins).toHaveLength(1);
    expect(farm!.feedingItems).toHaveLength(1);
  });

  it("deleting my account is refused while I am the last owner of a farm with others; my sole farms go with me", async () => {
    const me = await person("Leaver");
    const shared = await start(me, `Shared ${uniq()}`);
    const keeper = await person("Keeper");
    await join(keeper, shared.id, "keeper");
    const solo = await start(me, `Solo ${uniq()}`);
    await fillFarm(solo.id, me);

    const words = await refusal(deleteMyAccount(me, "yes"));
    expect(words.field).toBe("confirm");
    const e = await refusal(deleteMyAccount(me, "delete my account"));
    expect(e.code).toBe("conflict");
    expect(e.message).toContain(`last owner of ${shared.name}`);
    expect((await one(`select count(*) from users where id = $1`, [me])).count).toBe("1");
    expect((await countsOf(solo.id)).bins).toBe(1);

    await c.query(`update memberships set role = 'owner' where user_id = $1 and farm_id = $2`, [keeper, shared.id]);
    await deleteMyAccount(me, "Delete my account");
    expect((await one(`select count(*) from users where id = $1`, [me])).count).toBe("0");
    for (const [table, n] of Object.entries(await countsOf(solo.id))) expect(n, table).toBe(0);
    expect((await one(`select count(*) from farms where id = $1`, [shared.id])).count).toBe("1");
  });
});
