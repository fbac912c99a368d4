// Bad input through the built app and the real database: every answer is a 422 naming the field,
// nothing good is lost, a PATCH changes only what it names, and the web log gains no stack trace.
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { signIn, type Session } from "../../helpers/app";
import { pageText, submitForm } from "../../helpers/form";
import { addMember, makeFarm, type TestFarm } from "../series/fixtures";

type ErrorBody = { error: { code: string; message: string; field?: string } };

const PASSWORD = "bad-input-test-pass";
// Every text this file sends carries the tag, so a database error it caused would name it in the log.
const TAG = `bad-${randomBytes(4).toString("hex")}`;
const NUL = "\u0000";

let c: pg.Client;
let farm: TestFarm;
let other: TestFarm;
let owner: Session;
let keeper: Session;
let keeperEmail: string;
const emails: string[] = [];
const logFile = path.resolve(import.meta.dirname, "../../../.data", `${inject("clusterName")}-web.log`);
let logStart = 0;

async function expect422(res: Response, field: string): Promise<ErrorBody> {
  const text = await res.text();
  expect(res.status, text).toBe(422);
  const body = JSON.parse(text) as ErrorBody;
  expect(body.error.code).toBe("invalid");
  expect(body.error.field).toBe(field);
  // Plain words, nothing internal: no SQLSTATE, no driver wording, no stack.
  expect(body.error.message).not.toMatch(/SQLSTATE|byte sequence|postgres|drizzle|at .*\.js/i);
  return body;
}

const item = (over: Record<string, unknown> = {}) => ({ name: `vegetable scraps ${TAG}`, massKg: 2, moisturePct: 87, nitrogenPct: 2.7, cn: 19, ...over });
const feeding = (body: Record<string, unknown>) => keeper.fetch(`/api/bins/${farm.binId}/feedings`, { method: "POST", json: body });
const count = async (sql: string, params: unknown[]) => Number((await c.query(sql, params)).rows[0].n);

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  logStart = fs.existsSync(logFile) ? fs.statSync(logFile).size : 0;
  farm = await makeFarm(c, { zones: ["fresh", "curing"], timezone: "Europe/Dublin", name: `Zz Bad Input ${TAG}` });
  other = await makeFarm(c, { zones: ["working"], name: `Zz Other Farm ${TAG}` });
  const ownerEmail = await addMember(c, farm.farmId, "owner", PASSWORD);
  keeperEmail = await addMember(c, farm.farmId, "keeper", PASSWORD);
  emails.push(ownerEmail, keeperEmail);
  owner = await signIn(ownerEmail, PASSWORD);
  keeper = await signIn(keeperEmail, PASSWORD);
});

afterAll(async () => {
  if (c) {
    await c.query(`delete from farms where id = any($1)`, [[farm?.farmId, other?.farmId].filter(Boolean)]);
    await c.query(`delete from users where email = any($1)`, [emails]);
    await c.end();
  }
});

describe("a NUL byte in a text field", () => {
  const cases: { what: string; send: () => Promise<Response>; field: string }[] = [
    {
      what: "a bin name",
      field: "name",
      send: () =>
        owner.fetch(`/api/farms/${farm.farmId}/bins`, { method: "POST", json: { name: `Bin ${TAG}${NUL}`, style: "tote", species: "eisenia-fetida" } }),
    },
    { what: "a bin's notes", field: "notes", send: () => owner.fetch(`/api/bins/${farm.binId}`, { method: "PATCH", json: { notes: `lid ${TAG}${NUL}` } }) },
    { what: "a farm name", field: "name", send: () => owner.fetch(`/api/farms/${farm.farmId}`, { method: "PATCH", json: { name: `Farm ${TAG}${NUL}` } }) },
    { what: "a new farm's name", field: "name", send: () => owner.fetch(`/api/farms`, { method: "POST", json: { name: `Farm ${TAG}${NUL}` } }) },
    {
      what: "a zone name",
      field: "name",
      send: () => owner.fetch(`/api/zones/${farm.zones.fresh}`, { method: "PATCH", json: { name: `North ${TAG}${NUL}` } }),
    },
    {
      what: "a probe label",
      field: "label",
      send: () => owner.fetch(`/api/probes/${farm.probes[0]!.id}`, { method: "PATCH", json: { label: `drain ${TAG}${NUL}` } }),
    },
    {
      what: "a note",
      field: "text",
      send: () => keeper.fetch(`/api/bins/${farm.binId}/notes`, { method: "POST", json: { text: `springtails ${TAG}${NUL}` } }),
    },
    {
      what: "a watering's notes",
      field: "notes",
      send: () => keeper.fetch(`/api/bins/${farm.binId}/waterings`, { method: "POST", json: { litres: 1, notes: `dry ${TAG}${NUL}` } }),
    },
    { what: "a feeding item's name", field: "items.0.name", send: () => feeding({ items: [item({ name: `scraps ${TAG}${NUL}` })] }) },
    { what: "a feeding's notes", field: "notes", send: () => feeding({ notes: `heavy ${TAG}${NUL}`, items: [item()] }) },
    {
      what: "an ingredient's source",
      field: "source",
      send: () =>
        keeper.fetch(`/api/farms/${farm.farmId}/ingredients`, {
          method: "POST",
          json: { name: `Grain ${TAG}`, kind: "feedstock", moisturePct: 78, nitrogenPct: 4, cn: 12, source: `sheet${NUL}` },
        }),
    },
  ];

  it.each(cases)("a NUL byte in $what is a 422 naming $field", async ({ send, field }) => {
    const body = await expect422(await send(), field);
    expect(body.error.message).toMatch(/control character \(U\+0000\)/);
  });

  it("a NUL byte in the farm name on the settings form is refused beside the field", async () => {
    const out = await submitForm(owner, `/farms/${farm.farmId}/settings`, { name: `Farm ${TAG}${NUL}` }, "timezone");
    expect(out.status).toBe(200);
    expect(out.text).toContain("The name has a control character (U+0000) in it; type it again without it.");
  });

  it("nothing with a NUL byte was stored, and the bin kept its name", async () => {
    expect(
      await count(`select count(*)::int as n from bins where farm_id = $1 and (name like '%' || $2 || '%' or notes like '%' || $2 || '%')`, [farm.farmId, TAG]),
    ).toBe(0);
    expect(await count(`select count(*)::int as n from log_notes where bin_id = $1`, [farm.binId])).toBe(0);
    expect(await count(`select count(*)::int as n from feedings where bin_id = $1`, [farm.binId])).toBe(0);
    expect((await c.query(`select name from farms where id = $1`, [farm.farmId])).rows[0].name).toBe(`Zz Bad Input ${TAG}`);
  });
});

describe("amounts the database cannot hold", () => {
  it("a feeding mass of 5e-324 kg is a 422 naming the mass", async () => {
    const body = await expect422(await feeding({ items: [item(), item({ massKg: 5e-324 })] }), "items.1.massKg");
    expect(body.error.message).toMatch(/too small/);
    expect(await count(`select count(*)::int as n from feedings where bin_id = $1`, [farm.binId])).toBe(0);
  });

  it("a watering of 5e-324 L is a 422 naming litres", async () => {
    await expect422(await keeper.fetch(`/api/bins/${farm.binId}/waterings`, { method: "POST", json: { litres: 5e-324 } }), "litres");
  });

  it("a harvest of 1e-40 kg (below a real column's range) is a 422 naming massKg", async () => {
    await expect422(await keeper.fetch(`/api/bins/${farm.binId}/harvests`, { method: "POST", json: { massKg: 1e-40 } }), "massKg");
  });

  it("on an imperial farm a refused harvest or watering names lb and US gal, on a metric farm kg and L", async () => {
    const imperial = await makeFarm(c, { zones: ["working"], name: `Zz Imperial ${TAG}` });
    await c.query(`update farms set unit_system = 'imperial' where id = $1`, [imperial.farmId]);
    const email = await addMember(c, imperial.farmId, "keeper", PASSWORD);
    emails.push(email);
    const k = await signIn(email, PASSWORD);
    try {
      const harvest = await expect422(await k.fetch(`/api/bins/${imperial.binId}/harvests`, { method: "POST", json: { massKg: 1e6 } }), "massKg");
      expect(harvest.error.message).toMatch(/Mass cannot be over 220000 lb\.$/);
      const water = await expect422(await k.fetch(`/api/bins/${imperial.binId}/waterings`, { method: "POST", json: { litres: 1e6 } }), "litres");
      expect(water.error.message).toMatch(/Water cannot be over 2640 US gal\.$/);
      const metric = await expect422(await keeper.fetch(`/api/bins/${farm.binId}/harvests`, { method: "POST", json: { massKg: 1e6 } }), "massKg");
      expect(metric.error.message).toMatch(/Mass cannot be over 100000 kg\.$/);
    } finally {
      await c.query(`delete from farms where id = $1`, [imperial.farmId]);
    }
  });

  it("a bin 5e-324 cm long is a 422 naming lengthCm", async () => {
    await expect422(await owner.fetch(`/api/bins/${farm.binId}`, { method: "PATCH", json: { lengthCm: 5e-324 } }), "lengthCm");
  });

  it("an ingredient with 5e-324 % nitrogen is a 422 naming nitrogenPct", async () => {
    await expect422(
      await keeper.fetch(`/api/farms/${farm.farmId}/ingredients`, {
        method: "POST",
        json: { name: `Grain ${TAG}`, kind: "feedstock", moisturePct: 78, nitrogenPct: 5e-324, cn: 12, source: "supplier sheet" },
      }),
      "nitrogenPct",
    );
  });

  it("an oven-dry sample with a raw reading of 5e-324 is a 422 naming rawReading", async () => {
    await expect422(
      await keeper.fetch(`/api/probes/${farm.probes[0]!.id}/samples`, { method: "POST", json: { wetMassG: 10, dryMassG: 2.3, rawReading: 5e-324 } }),
      "rawReading",
    );
  });
});

describe("dates of logged work", () => {
  const soon = () => new Date(Date.now() + 3600_000).toISOString();

  it("a watering dated 0001-01-01 is refused", async () => {
    // Kept, it came back as 2001: PostgreSQL writes year 1 as "0001-…" and Date reads that as 2001.
    const body = await expect422(
      await keeper.fetch(`/api/bins/${farm.binId}/waterings`, { method: "POST", json: { litres: 1, at: "0001-01-01T00:00:00Z" } }),
      "at",
    );
    expect(body.error.message).toMatch(/before 2000/);
    expect(await count(`select count(*)::int as n from waterings where bin_id = $1`, [farm.binId])).toBe(0);
  });

  it("a feeding dated 2100 is refused", async () => {
    const body = await expect422(await feeding({ at: "2100-01-01T00:00:00Z", items: [item()] }), "at");
    expect(body.error.message).toMatch(/future/);
  });

  it.each([
    ["a harvest", "harvests", { massKg: 3 }],
    ["a note", "notes", { text: `later ${TAG}` }],
    ["a watering", "waterings", { litres: 1 }],
  ] as const)("%s dated an hour ahead is refused like a feeding", async (_what, kind, body) => {
    await expect422(await keeper.fetch(`/api/bins/${farm.binId}/${kind}`, { method: "POST", json: { ...body, at: soon() } }), "at");
  });

  it("an oven-dry sample dated an hour ahead is refused", async () => {
    await expect422(
      await keeper.fetch(`/api/probes/${farm.probes[0]!.id}/samples`, { method: "POST", json: { wetMassG: 10, dryMassG: 2.3, at: soon() } }),
      "at",
    );
  });

  it("a feeding dated after PostgreSQL's last year is a 422, not a 500", async () => {
    await expect422(await feeding({ at: "+275760-09-13T00:00:00Z", items: [item()] }), "at");
  });

  it("feedings listed since a year beyond PostgreSQL's range is a 422 naming since", async () => {
    await expect422(await keeper.fetch(`/api/bins/${farm.binId}/feedings?since=${encodeURIComponent("+275760-09-13T00:00:00Z")}`), "since");
  });

  it("a date on no calendar (30 February) is refused rather than moved to March", async () => {
    await expect422(await keeper.fetch(`/api/bins/${farm.binId}/notes`, { method: "POST", json: { text: `leap ${TAG}`, at: "2025-02-30T10:00:00Z" } }), "at");
  });

  it("a watering back-dated to a real day is kept exactly", async () => {
    const at = "2024-02-29T06:15:00.000Z";
    const res = await keeper.fetch(`/api/bins/${farm.binId}/waterings`, { method: "POST", json: { litres: 1.5, at } });
    expect(res.status, await res.clone().text()).toBe(201);
    const list = (await (await keeper.fetch(`/api/bins/${farm.binId}/waterings`)).json()) as { waterings: { at: string; litres: number }[] };
    expect(list.waterings.map((w) => w.at)).toContain(at);
  });
});

describe("a feeding's ingredient", () => {
  let theirs: string;
  let shared: string;
  beforeAll(async () => {
    theirs = (
      await c.query(
        `insert into ingredients (farm_id, key, name, kind, moisture_pct, nitrogen_pct, cn, source, source_status) values ($1, $2, 'Their grain', 'feedstock', 78, 4, 12, 'their sheet', 'farm') returning id`,
        [other.farmId, `farm:${TAG}`],
      )
    ).rows[0].id;
    shared = (await c.query(`select id from ingredients where farm_id is null order by key limit 1`)).rows[0].id;
  });

  it("another farm's ingredient in a feeding is a 422", async () => {
    const body = await expect422(await feeding({ items: [item(), item({ ingredientId: theirs })] }), "items.1.ingredientId");
    expect(body.error.message).toMatch(/not in this farm's list or the shared library/);
    expect(await count(`select count(*)::int as n from feeding_items where ingredient_id = $1`, [theirs])).toBe(0);
  });

  it("an unknown ingredient in a feeding is a 422", async () => {
    const body = await expect422(await feeding({ items: [item({ ingredientId: "5b0c1f7e-0000-4000-8000-000000000001" })] }), "items.0.ingredientId");
    // The same words as another farm's: an id tells nothing about whether it exists elsewhere.
    expect(body.error.message).toMatch(/not in this farm's list or the shared library/);
  });

  it("an ingredient id that is not an id is a 422 naming it", async () => {
    await expect422(await feeding({ items: [item({ ingredientId: `x${NUL}` })] }), "items.0.ingredientId");
  });

  it("the shared library's ingredient and the farm's own are logged", async () => {
    const own = await keeper.fetch(`/api/farms/${farm.farmId}/ingredients`, {
      method: "POST",
      json: { name: `Our grain ${TAG}`, kind: "feedstock", moisturePct: 78, nitrogenPct: 4, cn: 12, source: "supplier sheet" },
    });
    expect(own.status, await own.clone().text()).toBe(201);
    const ownId = ((await own.json()) as { ingredient: { id: string } }).ingredient.id;
    const res = await feeding({ items: [item({ ingredientId: shared }), item({ ingredientId: ownId })] });
    expect(res.status, await res.clone().text()).toBe(201);
    const id = ((await res.json()) as { feeding: { id: string } }).feeding.id;
    const rows = await c.query(`select ingredient_id from feeding_items where feeding_id = $1 order by ingredient_id`, [id]);
    expect(rows.rows.map((r) => r.ingredient_id).sort()).toEqual([shared, ownId].sort());
  });
});

describe("a PATCH changes only what it names", () => {
  it("PATCH /api/farms/:id with only a name keeps the time zone and units", async () => {
    await c.query(`update farms set unit_system = 'imperial', timezone = 'Europe/Dublin' where id = $1`, [farm.farmId]);
    const res = await owner.fetch(`/api/farms/${farm.farmId}`, { method: "PATCH", json: { name: `Zz Renamed ${TAG}` } });
    expect(res.status, await res.clone().text()).toBe(200);
    const row = (await c.query(`select name, unit_system, timezone from farms where id = $1`, [farm.farmId])).rows[0];
    expect(row).toEqual({ name: `Zz Renamed ${TAG}`, unit_system: "imperial", timezone: "Europe/Dublin" });
    await c.query(`update farms set name = $2 where id = $1`, [farm.farmId, `Zz Bad Input ${TAG}`]);
  });

  it("PATCH of a bin with only notes keeps its name, style and sizes", async () => {
    await c.query(`update bins set length_cm = 60, style = 'tote' where id = $1`, [farm.binId]);
    const before = (await c.query(`select name, style, species, length_cm from bins where id = $1`, [farm.binId])).rows[0];
    const res = await owner.fetch(`/api/bins/${farm.binId}`, { method: "PATCH", json: { notes: "lid cracked" } });
    expect(res.status, await res.clone().text()).toBe(200);
    const after = (await c.query(`select name, style, species, length_cm, notes from bins where id = $1`, [farm.binId])).rows[0];
    expect(after).toEqual({ ...before, notes: "lid cracked" });
  });

  it("PATCH of a zone with only a name keeps its kind and position", async () => {
    const res = await owner.fetch(`/api/zones/${farm.zones.curing}`, { method: "PATCH", json: { name: "By the door" } });
    expect(res.status, await res.clone().text()).toBe(200);
    expect((await c.query(`select kind, position, name from zones where id = $1`, [farm.zones.curing])).rows[0]).toEqual({
      kind: "curing",
      position: 2,
      name: "By the door",
    });
  });

  it("PATCH of a probe with only a label keeps its zone, metrics and interval", async () => {
    const p = farm.probes[1]!;
    await c.query(`update probes set report_interval_s = 300 where id = $1`, [p.id]);
    const before = (await c.query(`select zone_id, metrics, report_interval_s from probes where id = $1`, [p.id])).rows[0];
    const res = await owner.fetch(`/api/probes/${p.id}`, { method: "PATCH", json: { label: "by the drain" } });
    expect(res.status, await res.clone().text()).toBe(200);
    expect((await c.query(`select zone_id, metrics, report_interval_s, label from probes where id = $1`, [p.id])).rows[0]).toEqual({
      ...before,
      label: "by the drain",
    });
  });

  it("PATCH /api/me with only a time zone keeps quiet hours, and with one end changes only that end", async () => {
    await c.query(`update users set quiet_from = '22:00', quiet_to = '06:30', timezone = 'UTC' where email = $1`, [keeperEmail]);
    const tz = await keeper.fetch(`/api/me`, { method: "PATCH", json: { timezone: "Europe/Dublin" } });
    expect(tz.status, await tz.clone().text()).toBe(200);
    const end = await keeper.fetch(`/api/me`, { method: "PATCH", json: { quietFrom: "23:00" } });
    expect(end.status, await end.clone().text()).toBe(200);
    expect((await c.query(`select quiet_from, quiet_to, timezone from users where email = $1`, [keeperEmail])).rows[0]).toEqual({
      quiet_from: "23:00",
      quiet_to: "06:30",
      timezone: "Europe/Dublin",
    });
    // Clearing one end alone would leave half a quiet period.
    await expect422(await keeper.fetch(`/api/me`, { method: "PATCH", json: { quietTo: null } }), "quietTo");
  });

  it("PATCH of a member with only a role keeps the person on the farm", async () => {
    const email = await addMember(c, farm.farmId, "viewer", PASSWORD);
    emails.push(email);
    const id = (await c.query(`select id from users where email = $1`, [email])).rows[0].id;
    const res = await owner.fetch(`/api/farms/${farm.farmId}/members/${id}`, { method: "PATCH", json: { role: "keeper" } });
    expect(res.status, await res.clone().text()).toBe(200);
    expect((await c.query(`select role from memberships where user_id = $1 and farm_id = $2`, [id, farm.farmId])).rows[0].role).toBe("keeper");
  });

  it("an empty PATCH changes nothing and answers with what is stored", async () => {
    for (const p of [
      `/api/farms/${farm.farmId}`,
      `/api/bins/${farm.binId}`,
      `/api/zones/${farm.zones.fresh}`,
      `/api/probes/${farm.probes[0]!.id}`,
      `/api/me`,
    ]) {
      const res = await (p === "/api/me" ? keeper : owner).fetch(p, { method: "PATCH", json: {} });
      expect(res.status, `${p}: ${await res.clone().text()}`).toBe(200);
    }
    expect((await c.query(`select timezone from farms where id = $1`, [farm.farmId])).rows[0].timezone).toBe("Europe/Dublin");
  });
});

describe("time zones", () => {
  it("a time zone the app cannot use is refused by the API and the form", async () => {
    for (const tz of ["Mars/Olympus_Mons", "Etc/GMT+14", `Europe/Dublin${NUL}`, "+05:30"]) {
      await expect422(await owner.fetch(`/api/farms/${farm.farmId}`, { method: "PATCH", json: { timezone: tz } }), "timezone");
      await expect422(await owner.fetch(`/api/farms`, { method: "POST", json: { name: `Zz tz ${TAG}`, timezone: tz } }), "timezone");
      await expect422(await keeper.fetch(`/api/me`, { method: "PATCH", json: { timezone: tz } }), "timezone");
    }
    const settings = await submitForm(owner, `/farms/${farm.farmId}/settings`, { timezone: "Mars/Olympus_Mons" }, "timezone");
    expect(settings.text).toContain("Unknown time zone; use a name such as Europe/Dublin or UTC.");
    const me = await submitForm(keeper, `/me`, { timezone: "Mars/Olympus_Mons" }, "timezone");
    expect(me.text).toContain("Unknown time zone; use a name such as Europe/Dublin or UTC.");
    expect((await c.query(`select timezone from farms where id = $1`, [farm.farmId])).rows[0].timezone).toBe("Europe/Dublin");
    expect((await c.query(`select timezone from users where email = $1`, [keeperEmail])).rows[0].timezone).not.toMatch(/Mars/);
    expect(await count(`select count(*)::int as n from farms where name = $1`, [`Zz tz ${TAG}`])).toBe(0);
  });

  it("a zone name in any letter case is stored as Intl spells it", async () => {
    const res = await owner.fetch(`/api/farms/${farm.farmId}`, { method: "PATCH", json: { timezone: "europe/dublin" } });
    expect(res.status, await res.clone().text()).toBe(200);
    expect((await c.query(`select timezone from farms where id = $1`, [farm.farmId])).rows[0].timezone).toBe("Europe/Dublin");
  });

  it("a farm whose stored time zone the app cannot use still opens its settings page, and the form fixes it", async () => {
    // As the API let through before it checked: an archived bin's date is shown in the farm's zone.
    await c.query(`update farms set timezone = 'Mars/Olympus_Mons' where id = $1`, [farm.farmId]);
    const archived = await c.query(
      `insert into bins (farm_id, name, style, species, archived_at) values ($1, $2, 'tote', 'eisenia-fetida', now()) returning id`,
      [farm.farmId, `Old ${TAG}`],
    );
    try {
      const page = await owner.fetch(`/farms/${farm.farmId}/settings`);
      expect(page.status).toBe(200);
      expect(pageText(await page.text())).toContain(`Old ${TAG}`);
      const fixed = await submitForm(owner, `/farms/${farm.farmId}/settings`, { timezone: "Europe/Dublin" }, "timezone");
      expect(fixed.text).toContain("times in Europe/Dublin");
      expect((await c.query(`select timezone from farms where id = $1`, [farm.farmId])).rows[0].timezone).toBe("Europe/Dublin");
    } finally {
      await c.query(`delete from bins where id = $1`, [archived.rows[0].id]);
      await c.query(`update farms set timezone = 'Europe/Dublin' where id = $1`, [farm.farmId]);
    }
  });
});

describe("a logger CSV with NUL bytes", () => {
  const probe = () => farm.probes[0]!.code;
  const csvOf = (cells: string[][]) => ["time,probe,metric,value", ...cells.map((r) => r.join(","))].join("\n");
  const mapping = { time: "time", probe: "probe", metric: "metric", value: "value", timezone: "UTC" };

  it("a NUL byte in a CSV cell is reported on its row and the good rows are stored", async () => {
    const csv = csvOf([
      ["2025-03-01T08:00:00Z", probe(), "temperature", "21.5"], // 2
      ["2025-03-01T08:05:00Z", probe(), "temperature", `21${NUL}.7`], // 3
      ["2025-03-01T08:10:00Z", `${probe()}${NUL}`, "temperature", "21.9"], // 4
      ["2025-03-01T08:15:00Z", probe(), "temperature", "22.1"], // 5
    ]);
    const res = await owner.fetch(`/api/farms/${farm.farmId}/imports`, { method: "POST", json: { fileName: `nul-${TAG}.csv`, csv, mapping } });
    expect(res.status, await res.clone().text()).toBe(201);
    const out = (await res.json()) as { import: { rowsStored: number; rowsRejected: number; report: { line: number; reason: string }[] } };
    expect(out.import).toMatchObject({ rowsStored: 2, rowsRejected: 2 });
    expect(out.import.report.map((r) => r.line)).toEqual([3, 4]);
    expect(out.import.report[0]!.reason).toMatch(/^value \(column "value"\): "21U\+0000\.7" has a control character/);
    expect(out.import.report[1]!.reason).toMatch(/^probe \(column "probe"\)/);
    const stored = await c.query(
      `select value from readings where probe_id = $1 and ts between '2025-03-01T08:00:00Z' and '2025-03-01T08:15:00Z' order by ts`,
      [farm.probes[0]!.id],
    );
    expect(stored.rows.map((r) => Number(r.value))).toEqual([21.5, 22.1]);
  });

  it("a NUL byte in a CSV file name is refused in plain words, sent as JSON or as a form", async () => {
    const csv = csvOf([["2025-03-02T08:00:00Z", probe(), "temperature", "20"]]);
    const json = await expect422(
      await owner.fetch(`/api/farms/${farm.farmId}/imports`, { method: "POST", json: { fileName: `log${NUL}${TAG}.csv`, csv, mapping } }),
      "fileName",
    );
    expect(json.error.message).toMatch(/file name has a control character/);
    const form = new FormData();
    form.set("file", new File([csv], `log${NUL}${TAG}.csv`, { type: "text/csv" }));
    for (const [k, v] of Object.entries(mapping)) form.set(k, v);
    const multipart = await expect422(await owner.fetch(`/api/farms/${farm.farmId}/imports`, { method: "POST", body: form }), "file");
    expect(multipart.error.message).toMatch(/rename the file/);
    expect(await count(`select count(*)::int as n from imports where farm_id = $1 and file_name like 'log%' || $2 || '%'`, [farm.farmId, TAG])).toBe(0);
    expect(await count(`select count(*)::int as n from readings where probe_id = $1 and ts = '2025-03-02T08:00:00Z'`, [farm.probes[0]!.id])).toBe(0);
  });

  it("a NUL byte in a mapped column name is a 422 naming the field", async () => {
    const csv = csvOf([["2025-03-03T08:00:00Z", probe(), "temperature", "20"]]);
    await expect422(
      await owner.fetch(`/api/farms/${farm.farmId}/imports`, {
        method: "POST",
        json: { fileName: `cols-${TAG}.csv`, csv, mapping: { ...mapping, value: `value${NUL}` } },
      }),
      "value",
    );
  });
});

describe("the web log", () => {
  it("gained no unexpected error and no database refusal from these requests", () => {
    const text = fs.readFileSync(logFile, "utf8").slice(logStart);
    // Other files share the app: only entries that carry this file's tag are ours.
    const entries = text.split(/(?=\[wormward:)/).filter((e) => e.includes(TAG));
    expect(entries.filter((e) => /unexpected error|refused there/.test(e))).toEqual([]);
    expect(text).not.toMatch(new RegExp(`${TAG}[\\s\\S]{0,200}invalid byte sequence`));
  });
});
