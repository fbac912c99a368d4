// Every page of a farm, as its owner and as its viewer, on a phone (390×844), on a metric farm and on
// an imperial one: no raw field name in front of a message ("name: Give it a name."), no internal
// reference (a notes file, a code placeholder), and no unit of the other system. The owner also
// sends every form on every page with bad values, so the refusals are read too.
// Both farms are made here with the same history: readings of a day, a feeding, a watering, a
// harvest, a note, an oven-dry sample, and the alerts the rule runner raises from the readings.
import pg from "pg";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { UnitSystem } from "@/lib/domain/vocabulary";
import { appUrl, signIn } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { addToFarm, makePerson, uniq, type Person } from "../integration/team/fixtures";

// The rule runner below works on the app's database, the one the pages read.
process.env.DATABASE_URL = inject("appDbUrl");
delete process.env.VAPID_PUBLIC_KEY;
delete process.env.SMTP_PORT;

const SLOW = { timeout: 20_000 };

type Farm = { units: UnitSystem; id: string; owner: Person; viewer: Person; urls: string[] };

// A unit symbol after a number. Grams stay on both: an oven-dry sample is weighed on a lab balance in
// grams whatever the farm's units (TMECC Method 03.09, total solids and moisture, weighs in g).
const UNITS_OF: Record<UnitSystem, RegExp> = {
  metric: /\d\s?(°C|kg|L|mL|cm|mm|m³|°C\/h)(?![\p{L}\p{N}])/u,
  imperial: /\d\s?(°F|lb|lbs|oz|US gal|gal|in|ft|ft³|°F\/h)(?![\p{L}\p{N}])/u,
};
const OTHER: Record<UnitSystem, UnitSystem> = { metric: "imperial", imperial: "metric" };

// A field's key in front of a sentence, as zod paths or the API's `${field}: ${message}` print it:
// every key of every input schema (lib/domain/validation), alone or as a path ("items.0.massKg").
function schemaKeys(schema: unknown, into: Set<string>) {
  const def = (schema as { def?: { type?: string; shape?: Record<string, unknown>; element?: unknown; innerType?: unknown; in?: unknown; schema?: unknown } })
    ?.def;
  if (!def) return;
  if (def.shape)
    for (const [k, v] of Object.entries(def.shape)) {
      into.add(k);
      schemaKeys(v, into);
    }
  for (const inner of [def.element, def.innerType, def.in, def.schema]) if (inner) schemaKeys(inner, into);
}
const FIELD_KEYS = new Set<string>();
for (const mod of Object.values(import.meta.glob("../../lib/domain/validation/*.ts", { eager: true })))
  for (const exported of Object.values(mod as Record<string, unknown>)) schemaKeys(exported, FIELD_KEYS);
const RAW_FIELD = new RegExp(`(^|[\\s(])(${[...FIELD_KEYS].join("|")})(\\.[\\w.]+)?: [A-Z]`);
// Things of ours that are not for keepers: a notes file, a section of one, code that leaked. The notes
// files' names are joined from their parts, as in tests/unit/comments-cite-sources.test.ts, so this
// file holds no pointer to them of its own.
const NOTES = [["check", "values"].join("-"), ["verified", "techniques"].join("-"), ["shared", "(notes|reference)"].join("\\/")];
const INTERNAL = new RegExp(`\\b[\\w-]+\\.md\\b|${NOTES.join("|")}|\\bundefined\\b|\\bNaN\\b|\\[object Object\\]|\\bnull\\b|TODO|FIXME`);

let browser: Browser;
let c: pg.Client;
const farms: Farm[] = [];

async function json<T>(res: Response, status = 200): Promise<T> {
  if (res.status !== status) throw new Error(`${res.url}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

/** A farm in the given units, made by its owner through the API, with a day of readings. */
async function makeFarm(units: UnitSystem): Promise<Farm> {
  const owner = await makePerson(c, "Words owner");
  const viewer = await makePerson(c, "Words viewer");
  const s = await signIn(owner.email, owner.password);
  const { farm } = await json<{ farm: { id: string } }>(
    await s.fetch(`/api/farms`, { method: "POST", json: { name: `Words ${units} ${uniq()}`, unitSystem: units, timezone: "Europe/Dublin" } }),
    201,
  );
  await addToFarm(c, farm.id, viewer.id, "viewer");
  const { bin } = await json<{ bin: { id: string; zones: { id: string; kind: string }[] } }>(
    await s.fetch(`/api/farms/${farm.id}/bins`, {
      method: "POST",
      json: { name: "Cellar Bed", style: "flow-through", species: "eisenia-fetida", lengthCm: 120, widthCm: 60, depthCm: 45, zoneCount: 3 },
    }),
    201,
  );
  const binId = bin.id;
  const zones = bin.zones;
  const probes: { id: number; zoneId: string }[] = [];
  for (const [i, z] of zones.entries()) {
    const metrics = i === 0 ? ["temperature", "moisture", "ammonia"] : ["temperature", "moisture"];
    const { probe } = await json<{ probe: { id: number } }>(
      await s.fetch(`/api/farms/${farm.id}/probes`, { method: "POST", json: { code: `words-${uniq()}`, zoneId: z.id, label: `${z.kind} probe`, metrics } }),
      201,
    );
    probes.push({ id: probe.id, zoneId: z.id });
  }

  // A day every 5 minutes; the fresh zone heats hard in the last 20 minutes (a heat alert), the
  // curing zone is dry (a drying alert), the working zone stays comfortable.
  const { insertReadings } = await import("@/db/queries/readings");
  const now = Math.floor(Date.now() / 60_000) * 60_000;
  const rows: { probeId: number; metric: "temperature" | "moisture" | "ammonia"; ts: Date; value: number }[] = [];
  for (const [i, p] of probes.entries()) {
    for (let t = now - 24 * 3600_000; t <= now; t += 300_000) {
      const late = now - t <= 20 * 60_000;
      rows.push({ probeId: p.id, metric: "temperature", ts: new Date(t), value: i === 0 && late ? 33 : 21 + Math.sin(t / 7_200_000) });
      rows.push({ probeId: p.id, metric: "moisture", ts: new Date(t), value: i === 2 ? 52 : 78 });
      if (i === 0) rows.push({ probeId: p.id, metric: "ammonia", ts: new Date(t), value: 3 });
    }
    // The last 20 minutes every minute, so the rules' holds are met.
    for (let t = now - 20 * 60_000; t <= now; t += 60_000) rows.push({ probeId: p.id, metric: "temperature", ts: new Date(t), value: i === 0 ? 33 : 21 });
  }
  await insertReadings(rows);

  const hoursAgo = (h: number) => new Date(now - h * 3600_000).toISOString();
  const fresh = zones[0]!.id;
  await json(
    await s.fetch(`/api/bins/${binId}/feedings`, {
      method: "POST",
      json: {
        zoneId: fresh,
        at: hoursAgo(6),
        items: [
          { name: "Vegetable scraps", massKg: 4, moisturePct: 85, nitrogenPct: 2.5, cn: 15 },
          { name: "Shredded cardboard", massKg: 1.5, moisturePct: 8, nitrogenPct: 0.2, cn: 300 },
        ],
      },
    }),
    201,
  );
  await json(await s.fetch(`/api/bins/${binId}/waterings`, { method: "POST", json: { litres: 3, zoneId: zones[2]!.id, at: hoursAgo(5) } }), 201);
  await json(await s.fetch(`/api/bins/${binId}/harvests`, { method: "POST", json: { massKg: 6.2, zoneId: zones[2]!.id, at: hoursAgo(4) } }), 201);
  await json(await s.fetch(`/api/bins/${binId}/notes`, { method: "POST", json: { text: "Moved the lid for air.", at: hoursAgo(3) } }), 201);
  await json(
    await s.fetch(`/api/probes/${probes[1]!.id}/samples`, { method: "POST", json: { wetMassG: 52.3, dryMassG: 11.1, tareG: 0, rawReading: 1800 } }),
    201,
  );

  const { createRuleRunner } = await import("@/ingest/rule-runner");
  const runner = createRuleRunner({ coalesceMs: 10 });
  try {
    for (const z of zones) await runner.evaluate(z.id);
  } finally {
    await runner.stop();
  }
  const open = await c.query(`select kind, level from alerts where farm_id = $1 and state <> 'settled'`, [farm.id]);
  expect(open.rows.map((r) => r.kind)).toEqual(expect.arrayContaining(["heat", "drying"]));

  const f = `/farms/${farm.id}`;
  const urls = [
    f,
    `${f}/bins/${binId}`,
    `${f}/bins/${binId}/rules`,
    ...zones.map((z) => `${f}/zones/${z.id}`),
    `${f}/probes`,
    ...probes.map((p) => `${f}/probes/${p.id}`),
    `${f}/imports`,
    `${f}/settings`,
    `${f}/team`,
    `/me`,
  ];
  return { units, id: farm.id, owner, viewer, urls };
}

async function signedIn(person: Person): Promise<Page> {
  const p = await (await browser.newContext(PHONE)).newPage();
  await p.goto(`${appUrl()}/sign-in`);
  await p.getByLabel("E-mail").fill(person.email);
  await p.getByLabel("Password").fill(person.password);
  await p.getByRole("button", { name: "Sign in" }).click();
  await p.waitForURL(/\/farms\//, SLOW);
  return p;
}

/** What a person sees: the page's rendered text (closed <details> hold back theirs), less the
 * choices that name both systems on purpose (the units setting). */
async function visibleText(p: Page): Promise<string> {
  return p.evaluate(() => {
    const both = [...document.querySelectorAll<HTMLElement>("[data-both-units]")];
    for (const el of both) el.hidden = true;
    const text = document.body.innerText;
    for (const el of both) el.hidden = false;
    return text;
  });
}

type Finding = { url: string; what: string; line: string };

function findings(url: string, text: string, units: UnitSystem): Finding[] {
  const out: Finding[] = [];
  for (const line of new Set(text.split("\n"))) {
    if (RAW_FIELD.test(line)) out.push({ url, what: "raw field name", line });
    if (INTERNAL.test(line)) out.push({ url, what: "internal reference", line });
    if (UNITS_OF[OTHER[units]].test(line)) out.push({ url, what: `${OTHER[units]} unit on this ${units} farm`, line });
  }
  return out;
}

async function settle(p: Page) {
  await p.waitForLoadState("networkidle", SLOW).catch(() => {});
}

// Buttons that would leave, remove or hand over something, which the bad-input pass leaves alone.
const LEAVE_ALONE = /archive|remove|delete|revoke|leave|sign out|replace|bring back|reset|new token|turn on|turn off|enable|disable|test/i;

/** Sends every form of the page once with bad values: numbers negative, text fields empty. */
async function sendEveryFormBadly(p: Page, url: string, units: UnitSystem): Promise<Finding[]> {
  const out: Finding[] = [];
  const count = await p.locator("form").count();
  for (let i = 0; i < count; i++) {
    const form = p.locator("form").nth(i);
    if (!(await form.isVisible())) continue;
    const submit = form.locator('button[type="submit"], button:not([type])').last();
    if ((await submit.count()) === 0 || !(await submit.isVisible()) || !(await submit.isEnabled())) continue;
    const label = (await submit.innerText()).trim();
    if (LEAVE_ALONE.test(label)) continue;
    await form.evaluate((el: HTMLFormElement) => {
      el.noValidate = true;
      for (const input of el.querySelectorAll<HTMLInputElement>("input")) {
        if (input.type === "number") input.value = "-1";
        else if (["text", "email", "search", ""].includes(input.type) && !input.readOnly) input.value = "";
      }
    });
    // React keeps its own copy of a controlled value: type through the page as a person would.
    for (const input of await form.locator('input[type="number"]').all()) if (await input.isVisible()) await input.fill("-1");
    for (const input of await form.locator('input[type="text"], input[type="email"], input:not([type])').all())
      if ((await input.isVisible()) && (await input.isEditable())) await input.fill("");
    await submit.click();
    await settle(p);
    await p.waitForTimeout(300);
    out.push(...findings(`${url} (form "${label}")`, await visibleText(p), units));
  }
  return out;
}

beforeAll(async () => {
  browser = await launchBrowser();
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  farms.push(await makeFarm("metric"), await makeFarm("imperial"));
}, 120_000);

afterAll(async () => {
  for (const f of farms) await c?.query(`delete from farms where id = $1`, [f.id]).catch(() => {});
  await browser?.close();
  await c?.end();
});

describe.each(["metric", "imperial"] as const)("every page of a %s farm", (units) => {
  const farm = () => farms.find((f) => f.units === units)!;

  it("reads in plain words and the farm's units to its owner, also after every form is sent with bad values", async () => {
    const p = await signedIn(farm().owner);
    const found: Finding[] = [];
    for (const url of farm().urls) {
      await p.goto(`${appUrl()}${url}`);
      await settle(p);
      const text = await visibleText(p);
      expect(text.length, url).toBeGreaterThan(100);
      found.push(...findings(url, text, units));
      found.push(...(await sendEveryFormBadly(p, url, units)));
    }
    await p.goto(`${appUrl()}${farm().urls[0]}`);
    await settle(p);
    await p.screenshot({ path: screenshotPath(`words-today-${units}`), fullPage: true });
    expect(found).toEqual([]);
  }, 300_000);

  it("reads in plain words and the farm's units to its viewer", async () => {
    const p = await signedIn(farm().viewer);
    const found: Finding[] = [];
    for (const url of farm().urls) {
      await p.goto(`${appUrl()}${url}`);
      await settle(p);
      found.push(...findings(url, await visibleText(p), units));
    }
    expect(found).toEqual([]);
  }, 120_000);
});

describe("the checks themselves", () => {
  it("catch what they are for and pass plain sentences", () => {
    expect(FIELD_KEYS).toEqual(expect.objectContaining({ size: expect.any(Number) }));
    expect([...FIELD_KEYS]).toEqual(expect.arrayContaining(["name", "massKg", "litres", "unitSystem", "wetMassG"]));
    expect(findings("x", "items.0.massKg: Mass must be more than 0 kg.", "metric")).toHaveLength(1);
    expect(findings("x", "from memory: a usual value. Farm c3223d04: Viewer", "metric")).toEqual([]);
    expect(findings("x", "name: Give it a name.", "metric")).toHaveLength(1);
    expect(findings("x", `See ${NOTES[0]}.md, section 3`, "metric")).toHaveLength(1);
    expect(findings("x", `as in ${NOTES[1]}`, "metric")).toHaveLength(1);
    expect(findings("x", "Fresh zone 24.1 °C after a 1.5 kg feeding", "imperial").map((f) => f.what)).toEqual(["metric unit on this imperial farm"]);
    expect(findings("x", "Fresh zone 75.4 °F after a 3.3 lb feeding", "metric")).toHaveLength(1);
    expect(findings("x", "Fresh zone 75.4 °F after a 3.3 lb feeding, 5 min ago. Give it a name.", "imperial")).toEqual([]);
    expect(findings("x", "Fresh zone 24.1 °C after a 1.5 kg feeding, 52.3 g wet", "metric")).toEqual([]);
  });
});
