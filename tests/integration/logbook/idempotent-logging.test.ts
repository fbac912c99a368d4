// A log entry sent again under the same Idempotency-Key (a phone resending after a lost answer) is
// stored once: 201 the first time, 200 with the same body after. The key is per farm.
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { crewFarm, json, newBin, type Crew } from "./helpers";

type ErrorBody = { error: { code: string; field?: string; message: string } };

let crew: Crew;
let other: Crew;
let bin: Awaited<ReturnType<typeof newBin>>;
let otherBin: Awaited<ReturnType<typeof newBin>>;
let probe: number;

beforeAll(async () => {
  crew = await crewFarm("Zz Idempotent Log Farm");
  other = await crewFarm("Zz Idempotent Log Other Farm");
  bin = await newBin(crew.owner, crew.farmId);
  otherBin = await newBin(other.owner, other.farmId);
  probe = (
    await crew.db.query(`insert into probes (farm_id, zone_id, code, token_hash, metrics) values ($1, $2, $3, 'x', '{moisture-raw}') returning id`, [
      crew.farmId,
      bin.zones[0]!.id,
      `idem-${Math.random().toString(36).slice(2, 9)}`,
    ])
  ).rows[0].id as number;
});
afterAll(async () => {
  await crew?.close();
  await other?.close();
});

const feeding = (kg: number) => ({
  zoneId: null,
  notes: "coffee grounds and card",
  items: [
    { name: "Coffee grounds", massKg: kg, moisturePct: 62, nitrogenPct: 2.3, cn: 20 },
    { name: "Shredded card", massKg: 0.4, moisturePct: 8, nitrogenPct: 0.1, cn: 350 },
  ],
});

// Each kind: where it is posted, a body, a second body, and the table its rows land in.
const kinds = () =>
  [
    { path: `/api/bins/${bin.id}/feedings`, body: feeding(1.3), otherBody: feeding(2.1), table: "feedings", entry: "feeding" },
    { path: `/api/bins/${bin.id}/waterings`, body: { litres: 1.5, notes: "dry corner" }, otherBody: { litres: 4 }, table: "waterings", entry: "watering" },
    { path: `/api/bins/${bin.id}/harvests`, body: { massKg: 3.2 }, otherBody: { massKg: 9 }, table: "harvests", entry: "harvest" },
    {
      path: `/api/bins/${bin.id}/notes`,
      body: { text: "springtails under the lid" },
      otherBody: { text: "something else" },
      table: "log_notes",
      entry: "note",
    },
    {
      path: `/api/probes/${probe}/samples`,
      body: { wetMassG: 10, dryMassG: 2.3, rawReading: 455 },
      otherBody: { wetMassG: 20, dryMassG: 9 },
      table: "oven_dry_samples",
      entry: "sample",
    },
  ] as const;

const rowsUnder = async (c: Crew, table: string, key: string) =>
  (await c.db.query(`select count(*)::int as n from ${table} where farm_id = $1 and client_key = $2`, [c.farmId, key])).rows[0].n as number;

describe("Idempotency-Key on log entries", () => {
  it("the same key twice stores one row: 201 then 200 with the same body", async () => {
    for (const k of kinds()) {
      const key = randomUUID();
      const post = () => crew.keeper.fetch(k.path, { method: "POST", json: k.body, headers: { "Idempotency-Key": key } });
      const first = await post();
      expect(first.status, k.path).toBe(201);
      const firstBody = await first.json();
      const again = await post();
      expect(again.status, k.path).toBe(200);
      expect(await again.json(), k.path).toEqual(firstBody);
      expect(await rowsUnder(crew, k.table, key), k.table).toBe(1);
    }
  });

  it("a feeding replayed keeps its items once", async () => {
    const key = randomUUID();
    for (let i = 0; i < 2; i++)
      await crew.keeper.fetch(`/api/bins/${bin.id}/feedings`, { method: "POST", json: feeding(0.8), headers: { "Idempotency-Key": key } });
    const items = await crew.db.query(`select count(*)::int as n from feeding_items i join feedings f on f.id = i.feeding_id where f.client_key = $1`, [key]);
    expect(items.rows[0].n).toBe(2);
  });

  it("sent at the same moment twice, the entry is still stored once", async () => {
    const key = randomUUID();
    const post = () => crew.keeper.fetch(`/api/bins/${bin.id}/waterings`, { method: "POST", json: { litres: 2 }, headers: { "Idempotency-Key": key } });
    const statuses = (await Promise.all([post(), post(), post()])).map((r) => r.status).sort();
    expect(statuses).toEqual([200, 200, 201]);
    expect(await rowsUnder(crew, "waterings", key)).toBe(1);
  });

  it("a key reused by another member of the farm for another body is still one row, the first", async () => {
    for (const k of kinds()) {
      const key = randomUUID();
      const first = await crew.keeper.fetch(k.path, { method: "POST", json: k.body, headers: { "Idempotency-Key": key } });
      expect(first.status, k.path).toBe(201);
      const firstBody = (await first.json()) as Record<string, unknown>;
      const second = await crew.owner.fetch(k.path, { method: "POST", json: k.otherBody, headers: { "Idempotency-Key": key } });
      expect(second.status, k.path).toBe(200);
      // The entry stored first, with the first keeper's values and name.
      expect(((await second.json()) as Record<string, unknown>)[k.entry], k.path).toEqual(firstBody[k.entry]);
      expect(await rowsUnder(crew, k.table, key), k.table).toBe(1);
    }
  });

  it("another farm's keys are its own: the same key there stores that farm's entry", async () => {
    const key = randomUUID();
    const here = await crew.keeper.fetch(`/api/bins/${bin.id}/notes`, { method: "POST", json: { text: "ours" }, headers: { "Idempotency-Key": key } });
    const there = await other.keeper.fetch(`/api/bins/${otherBin.id}/notes`, { method: "POST", json: { text: "theirs" }, headers: { "Idempotency-Key": key } });
    expect([here.status, there.status]).toEqual([201, 201]);
    expect((await json<{ note: { text: string } }>(there)).note.text).toBe("theirs");
    expect(await rowsUnder(crew, "log_notes", key)).toBe(1);
    expect(await rowsUnder(other, "log_notes", key)).toBe(1);
  });

  it("no key: each post is its own entry, as before", async () => {
    const post = () => crew.keeper.fetch(`/api/bins/${bin.id}/harvests`, { method: "POST", json: { massKg: 0.25, notes: "no-key harvest" } });
    expect([(await post()).status, (await post()).status]).toEqual([201, 201]);
    const n = await crew.db.query(`select count(*)::int as n from harvests where bin_id = $1 and notes = 'no-key harvest' and client_key is null`, [bin.id]);
    expect(n.rows[0].n).toBe(2);
  });

  it("a malformed key is a 422 naming the header, and nothing is stored", async () => {
    for (const bad of ["short", "x".repeat(101), "has space in it", "semi;colon-key", "key/with/slash"]) {
      const res = await crew.keeper.fetch(`/api/bins/${bin.id}/waterings`, { method: "POST", json: { litres: 7.7 }, headers: { "Idempotency-Key": bad } });
      expect(res.status, bad).toBe(422);
      const body = await json<ErrorBody>(res);
      expect(body.error.field).toBe("Idempotency-Key");
      expect(body.error.message).toContain("Idempotency-Key");
    }
    const n = await crew.db.query(`select count(*)::int as n from waterings where bin_id = $1 and litres = 7.7`, [bin.id]);
    expect(n.rows[0].n).toBe(0);
  });

  it("the key does not open a door: a viewer's post with a stored key is still refused", async () => {
    const key = randomUUID();
    await crew.keeper.fetch(`/api/bins/${bin.id}/notes`, { method: "POST", json: { text: "kept" }, headers: { "Idempotency-Key": key } });
    const res = await crew.viewer.fetch(`/api/bins/${bin.id}/notes`, { method: "POST", json: { text: "kept" }, headers: { "Idempotency-Key": key } });
    expect(res.status).toBe(403);
    const stranger = await other.otherKeeper.fetch(`/api/bins/${bin.id}/notes`, {
      method: "POST",
      json: { text: "kept" },
      headers: { "Idempotency-Key": key },
    });
    expect(stranger.status).toBe(404);
  });
});
