// The farm-wide logbook: every kind in one list, its filters (kind, bin, zone, who, farm-local days),
// paging, shifts (logged once per Idempotency-Key, undone like the rest), the CSV and readings
// exports, and who may see and do what.
import { parse } from "csv-parse/sync";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseSenml } from "@/lib/domain/senml";
import { readingFromRecord } from "@/lib/domain/metrics";
import { crewFarm, json, newBin, type Crew } from "./helpers";

type Entry = {
  kind: string;
  id: string;
  at: string;
  binId: string;
  zoneId: string | null;
  toZoneId?: string | null;
  byName: string | null;
  text?: string;
  items?: { name: string; massKg: number }[];
};
type Page = { entries: Entry[]; older: string | null };
type ErrorBody = { error: { code: string; field?: string; message: string } };

let crew: Crew;
let other: Crew;
let binA: Awaited<ReturnType<typeof newBin>>;
let binB: Awaited<ReturnType<typeof newBin>>;
let otherBin: Awaited<ReturnType<typeof newBin>>;
const ids: Record<string, string> = {};

const feeding = { items: [{ name: "vegetable scraps", massKg: 2, moisturePct: 87, nitrogenPct: 2.7, cn: 19 }] };

async function post(s: Crew["keeper"], path: string, body: unknown, headers: Record<string, string> = {}) {
  const res = await s.fetch(path, { method: "POST", json: body, headers });
  if (res.status !== 201) throw new Error(`${path}: ${res.status} ${await res.text()}`);
  return (await res.json()) as Record<string, { id: string }>;
}

// Times in May 2025 around midnight in Chicago (UTC−5 in summer time), so the day filters are tested
// against the farm's time zone and not UTC's.
beforeAll(async () => {
  crew = await crewFarm("Zz Farm Logbook Farm");
  other = await crewFarm("Zz Farm Logbook Other Farm");
  await crew.db.query(`update farms set timezone = 'America/Chicago' where id = $1`, [crew.farmId]);
  binA = await newBin(crew.owner, crew.farmId);
  binB = await newBin(crew.owner, crew.farmId);
  otherBin = await newBin(other.owner, other.farmId);
  const [z0, z1, z2] = binA.zones.map((z) => z.id);
  ids.feeding = (await post(crew.keeper, `/api/bins/${binA.id}/feedings`, { ...feeding, zoneId: z0, at: "2025-05-01T15:00:00Z" })).feeding!.id;
  ids.watering = (await post(crew.keeper, `/api/bins/${binA.id}/waterings`, { litres: 3, zoneId: z1, at: "2025-05-02T04:30:00Z" })).watering!.id; // 1 May, 23:30 in Chicago
  ids.shift = (await post(crew.otherKeeper, `/api/bins/${binA.id}/shifts`, { zoneId: z1, toZoneId: z2, volumeL: 20, at: "2025-05-02T05:30:00Z" })).shift!.id; // 2 May, 00:30
  ids.harvest = (await post(crew.owner, `/api/bins/${binB.id}/harvests`, { massKg: 4.5, at: "2025-05-03T12:00:00Z" })).harvest!.id;
  ids.note = (await post(crew.keeper, `/api/bins/${binB.id}/notes`, { text: '=HYPERLINK("http://x")', at: "2025-05-04T12:00:00Z" })).note!.id;
  ids.otherNote = (await post(other.owner, `/api/bins/${otherBin.id}/notes`, { text: "other farm's note", at: "2025-05-04T12:00:00Z" })).note!.id;
});
afterAll(async () => {
  await crew?.close();
  await other?.close();
});

const list = async (s: Crew["keeper"], q = "") => json<Page>(await s.fetch(`/api/farms/${crew.farmId}/logbook${q ? `?${q}` : ""}`));
const userId = async (email: string) => (await crew.db.query(`select id from users where email = $1`, [email])).rows[0].id as string;

describe("one logbook for the farm", () => {
  it("lists every kind of every bin newest first, a feeding with its items; nothing of another farm", async () => {
    const page = await list(crew.viewer);
    expect(page.entries.map((e) => e.kind)).toEqual(["note", "harvest", "shift", "watering", "feeding"]);
    expect(page.entries.map((e) => e.id)).not.toContain(ids.otherNote);
    const fed = page.entries.find((e) => e.kind === "feeding")!;
    expect(fed.items?.map((i) => [i.name, i.massKg])).toEqual([["vegetable scraps", 2]]);
    expect(page.entries.find((e) => e.kind === "shift")).toMatchObject({ zoneId: binA.zones[1]!.id, toZoneId: binA.zones[2]!.id });
    expect(page.older).toBeNull();
  });

  it("the bin's own logbook lists its shift too", async () => {
    const res = await crew.viewer.fetch(`/api/bins/${binA.id}/logbook`);
    expect((await json<{ entries: Entry[] }>(res)).entries.map((e) => e.kind)).toEqual(["shift", "watering", "feeding"]);
  });

  it("filters by kind, by bin, by zone (a shift's either end), by who", async () => {
    expect((await list(crew.viewer, "kind=shift")).entries.map((e) => e.id)).toEqual([ids.shift]);
    expect((await list(crew.viewer, `bin=${binB.id}`)).entries.map((e) => e.kind)).toEqual(["note", "harvest"]);
    expect((await list(crew.viewer, `zone=${binA.zones[2]!.id}`)).entries.map((e) => e.kind)).toEqual(["shift"]);
    expect((await list(crew.viewer, `zone=${binA.zones[1]!.id}`)).entries.map((e) => e.kind)).toEqual(["shift", "watering"]);
    const keeper = await userId("tomas@alder-row.example");
    expect((await list(crew.viewer, `who=${keeper}`)).entries.map((e) => e.kind)).toEqual(["note", "watering", "feeding"]);
    expect((await list(crew.viewer, `kind=note&bin=${binA.id}`)).entries).toEqual([]);
  });

  it("filters by days of the farm's time zone, both ends inclusive", async () => {
    // 04:30 UTC on 2 May is still 1 May in Chicago; 05:30 UTC is 2 May.
    expect((await list(crew.viewer, "from=2025-05-02&to=2025-05-02")).entries.map((e) => e.kind)).toEqual(["shift"]);
    expect((await list(crew.viewer, "from=2025-05-01&to=2025-05-01")).entries.map((e) => e.kind)).toEqual(["watering", "feeding"]);
    expect((await list(crew.viewer, "from=2025-05-03")).entries.map((e) => e.kind)).toEqual(["note", "harvest"]);
    expect((await list(crew.viewer, "to=2025-05-01")).entries.map((e) => e.kind)).toEqual(["watering", "feeding"]);
  });

  it("refuses a bad filter with its field named", async () => {
    for (const [q, field] of [
      ["kind=compost", "kind"],
      ["bin=nope", "bin"],
      ["from=2025-02-30", "from"],
      ["from=2025-05-03&to=2025-05-01", "to"],
      ["before=yesterday", "before"],
    ] as const) {
      const res = await crew.viewer.fetch(`/api/farms/${crew.farmId}/logbook?${q}`);
      expect(res.status, q).toBe(422);
      expect((await json<ErrorBody>(res)).error.field, q).toBe(field);
    }
  });

  it("pages back with `older` until the end, each entry once, in order", async () => {
    const all = (await list(crew.viewer)).entries.map((e) => e.id);
    const seen: string[] = [];
    let q = "limit=2";
    for (let i = 0; i < 10; i++) {
      const page = await list(crew.viewer, q);
      expect(page.entries.length).toBeLessThanOrEqual(2);
      seen.push(...page.entries.map((e) => e.id));
      if (!page.older) break;
      q = `limit=2&before=${encodeURIComponent(page.older)}`;
    }
    expect(seen).toEqual(all);
    // Paging keeps the filters.
    const first = await list(crew.viewer, `limit=1&bin=${binA.id}`);
    const second = await list(crew.viewer, `limit=1&bin=${binA.id}&before=${encodeURIComponent(first.older!)}`);
    expect([...first.entries, ...second.entries].map((e) => e.kind)).toEqual(["shift", "watering"]);
  });
});

describe("paging at one instant", () => {
  it("shows entries logged within one millisecond, or at the very same instant, each once", async () => {
    const made = await crew.db.query(
      `insert into log_notes (farm_id, bin_id, at, text) values
         ($1, $2, '2024-01-01T12:00:00.000100Z', 'a'), ($1, $2, '2024-01-01T12:00:00.000200Z', 'b'),
         ($1, $2, '2024-01-01T12:00:00.000200Z', 'c'), ($1, $2, '2024-01-01T12:00:00.000300Z', 'd')
       returning id`,
      [crew.farmId, binB.id],
    );
    try {
      const seen: string[] = [];
      let q = "limit=1&to=2024-01-01";
      for (let i = 0; i < 10; i++) {
        const page = await list(crew.viewer, q);
        seen.push(...page.entries.map((e) => e.text ?? ""));
        if (!page.older) break;
        q = `limit=1&to=2024-01-01&before=${encodeURIComponent(page.older)}`;
      }
      expect(seen.slice(0, 1)).toEqual(["d"]);
      expect([...seen.slice(1, 3)].sort()).toEqual(["b", "c"]);
      expect(seen.slice(3)).toEqual(["a"]);
    } finally {
      await crew.db.query(`delete from log_notes where id = any($1::uuid[])`, [made.rows.map((r) => r.id)]);
    }
  });
});

describe("another farm", () => {
  it("answers 404 for its logbook, its exports, and its zone or bin named on one's own farm", async () => {
    const theirs = other.farmId;
    for (const path of [
      `/api/farms/${theirs}/logbook`,
      `/api/farms/${theirs}/logbook/export?format=csv`,
      `/api/farms/${theirs}/readings/export?zoneId=${otherBin.zones[0]!.id}&from=2025-05-01&to=2025-05-02`,
      `/api/farms/${crew.farmId}/readings/export?zoneId=${otherBin.zones[0]!.id}&from=2025-05-01&to=2025-05-02`,
      `/api/farms/${crew.farmId}/readings/export?binId=${otherBin.id}&from=2025-05-01&to=2025-05-02&format=senml`,
    ]) {
      // The demo people belong to both test farms; this farm's second keeper and viewer do not.
      for (const who of [crew.otherKeeper, crew.viewer]) expect((await who.fetch(path)).status, path).toBe(404);
    }
    const shift = await crew.owner.fetch(`/api/bins/${otherBin.id}/shifts`, {
      method: "POST",
      json: { zoneId: otherBin.zones[0]!.id, toZoneId: otherBin.zones[1]!.id },
    });
    expect(shift.status).toBe(201);
    const stranger = await crew.otherKeeper.fetch(`/api/bins/${otherBin.id}/shifts`, {
      method: "POST",
      json: { zoneId: otherBin.zones[0]!.id, toZoneId: otherBin.zones[1]!.id },
    });
    expect(stranger.status).toBe(404);
  });
});

describe("shifts", () => {
  it("a viewer may read and export the logbook but not log a shift", async () => {
    expect((await crew.viewer.fetch(`/api/farms/${crew.farmId}/logbook`)).status).toBe(200);
    expect((await crew.viewer.fetch(`/api/farms/${crew.farmId}/logbook/export?format=csv`)).status).toBe(200);
    const res = await crew.viewer.fetch(`/api/bins/${binA.id}/shifts`, { method: "POST", json: { zoneId: binA.zones[0]!.id, toZoneId: binA.zones[1]!.id } });
    expect(res.status).toBe(403);
    expect((await json<ErrorBody>(res)).error.code).toBe("forbidden");
  });

  it("is stored once for one Idempotency-Key: 201, then 200 with the same shift", async () => {
    const key = `shift-${Math.random().toString(36).slice(2, 12)}`;
    const body = { zoneId: binA.zones[0]!.id, toZoneId: binA.zones[1]!.id, volumeL: 5 };
    const send = () => crew.keeper.fetch(`/api/bins/${binA.id}/shifts`, { method: "POST", json: body, headers: { "Idempotency-Key": key } });
    const first = await send();
    expect(first.status).toBe(201);
    const again = await send();
    expect(again.status).toBe(200);
    const a = (await json<{ shift: { id: string } }>(first)).shift;
    const b = (await json<{ shift: { id: string } }>(again)).shift;
    expect(b).toEqual(a);
    const n = await crew.db.query(`select count(*)::int as n from shifts where farm_id = $1 and client_key = $2`, [crew.farmId, key]);
    expect(n.rows[0].n).toBe(1);
    // Without a key, each post is its own shift.
    const plain = await crew.keeper.fetch(`/api/bins/${binA.id}/shifts`, { method: "POST", json: body });
    expect(plain.status).toBe(201);
    expect((await json<{ shift: { id: string } }>(plain)).shift.id).not.toBe(a.id);
    await crew.db.query(`delete from shifts where farm_id = $1 and (client_key = $2 or volume_l = 5)`, [crew.farmId, key]);
  });

  it("refuses a bad key, the same zone twice, and a zone of another bin, naming the field", async () => {
    const bad = await crew.keeper.fetch(`/api/bins/${binA.id}/shifts`, {
      method: "POST",
      json: { zoneId: binA.zones[0]!.id, toZoneId: binA.zones[1]!.id },
      headers: { "Idempotency-Key": "no spaces!" },
    });
    expect(bad.status).toBe(422);
    expect((await json<ErrorBody>(bad)).error.field).toBe("Idempotency-Key");
    const same = await crew.keeper.fetch(`/api/bins/${binA.id}/shifts`, { method: "POST", json: { zoneId: binA.zones[0]!.id, toZoneId: binA.zones[0]!.id } });
    expect(same.status).toBe(422);
    expect((await json<ErrorBody>(same)).error.field).toBe("toZoneId");
    const elsewhere = await crew.keeper.fetch(`/api/bins/${binA.id}/shifts`, {
      method: "POST",
      json: { zoneId: binA.zones[0]!.id, toZoneId: binB.zones[0]!.id },
    });
    expect(elsewhere.status).toBe(422);
    expect((await json<ErrorBody>(elsewhere)).error.field).toBe("toZoneId");
    const tooMuch = await crew.keeper.fetch(`/api/bins/${binA.id}/shifts`, {
      method: "POST",
      json: { zoneId: binA.zones[0]!.id, toZoneId: binA.zones[1]!.id, volumeL: 20_000 },
    });
    expect(tooMuch.status).toBe(422);
    expect((await json<ErrorBody>(tooMuch)).error).toMatchObject({ field: "volumeL" });
  });

  it("is undone like any entry: by its author within a day, not by another keeper", async () => {
    const made = await post(crew.keeper, `/api/bins/${binA.id}/shifts`, { zoneId: binA.zones[0]!.id, toZoneId: binA.zones[2]!.id });
    const byOther = await crew.otherKeeper.fetch(`/api/logbook/shift/${made.shift!.id}`, { method: "DELETE" });
    expect(byOther.status).toBe(403);
    const byAuthor = await crew.keeper.fetch(`/api/logbook/shift/${made.shift!.id}`, { method: "DELETE" });
    expect(byAuthor.status).toBe(200);
    expect((await crew.db.query(`select 1 from shifts where id = $1`, [made.shift!.id])).rowCount).toBe(0);
  });
});

describe("CSV export of the logbook", () => {
  it("is a download of the filtered entries in the farm's units and time zone, formulas neutralised", async () => {
    await crew.db.query(`update farms set unit_system = 'imperial' where id = $1`, [crew.farmId]);
    try {
      const res = await crew.viewer.fetch(`/api/farms/${crew.farmId}/logbook/export?format=csv&from=2025-05-01&to=2025-05-04`);
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
      expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="Zz-Farm-Logbook-Farm-logbook-2025-05-01-2025-05-04\.csv"$/);
      const text = await res.text();
      expect(text).toContain("\r\n");
      const rows = parse(text, { bom: true, columns: true }) as Record<string, string>[];
      expect(rows.map((r) => r.kind)).toEqual(["note", "harvest", "shift", "watering", "feeding"]);
      expect(Object.keys(rows[0]!)).toEqual(
        expect.arrayContaining(["time (America/Chicago, ISO 8601 with offset)", "volume (US gal)", "mass (lb)", "mix check", "entry id"]),
      );
      const note = rows.find((r) => r.kind === "note")!;
      expect(note.note).toBe(`'=HYPERLINK("http://x")`);
      const watering = rows.find((r) => r.kind === "watering")!;
      expect(watering["time (America/Chicago, ISO 8601 with offset)"]).toBe("2025-05-01T23:30:00-05:00");
      expect(Number(watering["volume (US gal)"])).toBeCloseTo(3 / 3.785411784, 3); // NIST Handbook 44 App. C: 1 US gal = 3.785411784 L
      const harvest = rows.find((r) => r.kind === "harvest")!;
      expect(Number(harvest["mass (lb)"])).toBeCloseTo(4.5 / 0.45359237, 2); // 1 lb = 0.453 592 37 kg exactly
      const fed = rows.find((r) => r.kind === "feeding")!;
      expect(fed["items (lb each)"]).toMatch(/^vegetable scraps 4\.40\d/);
      expect(fed["mix check"]).not.toBe("");
      expect(rows.find((r) => r.kind === "shift")).toMatchObject({ zone: "Working zone", "to zone": "Curing zone" });
    } finally {
      await crew.db.query(`update farms set unit_system = 'metric' where id = $1`, [crew.farmId]);
    }
  });
});

describe("readings export", () => {
  let probeId: number;
  beforeAll(async () => {
    probeId = (
      await crew.db.query(`insert into probes (farm_id, zone_id, code, token_hash) values ($1, $2, $3, 'x') returning id`, [
        crew.farmId,
        binA.zones[0]!.id,
        `lb-${Math.random().toString(36).slice(2, 8)}`,
      ])
    ).rows[0].id;
    await crew.db.query(
      `insert into readings (probe_id, metric, ts, value) values
        ($1, 'temperature', '2025-05-01T12:00:00Z', -3.5), ($1, 'moisture', '2025-05-01T12:00:00Z', 62),
        ($1, 'temperature', '2025-05-02T12:00:00Z', 24), ($1, 'signal', '2025-05-01T12:00:00Z', -71)`,
      [probeId],
    );
  });

  it("CSV: the zone's readings for the days asked, times with the farm's offset, negative numbers as numbers", async () => {
    const res = await crew.viewer.fetch(
      `/api/farms/${crew.farmId}/readings/export?zoneId=${binA.zones[0]!.id}&from=2025-05-01&to=2025-05-01&metric=temperature,signal`,
    );
    expect(res.status).toBe(200);
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="[A-Za-z0-9_-]+\.csv"$/);
    const rows = parse(await res.text(), { bom: true, columns: true }) as Record<string, string>[];
    expect(rows.map((r) => [r.metric, r.value, r.unit])).toEqual([
      ["Temperature", "-3.5", "°C"],
      ["Signal", "-71", "dBm"],
    ]);
    expect(rows[0]!["time (America/Chicago, ISO 8601 with offset)"]).toBe("2025-05-01T07:00:00-05:00");
  });

  it("SenML: the bin's readings read back with our parser to the stored values", async () => {
    const res = await crew.viewer.fetch(`/api/farms/${crew.farmId}/readings/export?binId=${binA.id}&from=2025-05-01&to=2025-05-02&format=senml`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/senml+json");
    const parsed = parseSenml(await res.text());
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const back = parsed.records.map((r) => {
      const got = readingFromRecord(r);
      if (!got.ok) throw new Error(got.reason);
      return [got.reading.metric, Number(got.reading.value!.toFixed(6)), new Date(got.reading.time * 1000).toISOString()];
    });
    expect(back).toEqual(
      expect.arrayContaining([
        ["temperature", -3.5, "2025-05-01T12:00:00.000Z"],
        ["moisture", 62, "2025-05-01T12:00:00.000Z"],
        ["signal", -71, "2025-05-01T12:00:00.000Z"],
        ["temperature", 24, "2025-05-02T12:00:00.000Z"],
      ]),
    );
    expect(back).toHaveLength(4);
  });

  it("asks for a zone or a bin, and names a bad range", async () => {
    const none = await crew.viewer.fetch(`/api/farms/${crew.farmId}/readings/export?from=2025-05-01&to=2025-05-02`);
    expect(none.status).toBe(422);
    expect((await json<ErrorBody>(none)).error.field).toBe("zoneId");
    const empty = await crew.viewer.fetch(`/api/farms/${crew.farmId}/readings/export?binId=${binB.id}&from=2025-05-01&to=2025-05-02&format=senml`);
    expect(empty.status).toBe(422);
    const backwards = await crew.viewer.fetch(`/api/farms/${crew.farmId}/readings/export?binId=${binA.id}&from=2025-05-03&to=2025-05-02`);
    expect((await json<ErrorBody>(backwards)).error.field).toBe("to");
  });
});
