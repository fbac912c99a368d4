// Every JSON body an API route takes, fuzzed two ways:
// 1. in process (the bulk): the route's own steps after the session check, i.e. the body reader
//    (readJson / readOptionalJson, lib/web/errors.ts), the route's zod schema and, for rules, the
//    threshold check the use case runs (lib/domain/rules/params.ts); the status comes from errorBody;
// 2. over the network: the built app, signed in as the farm's owner, with the same bodies.
// Every answer is a 2xx or a 4xx in the one error envelope with words; never a 500.
import assert from "node:assert/strict";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import fc from "fast-check";
import { ZodError, type ZodType } from "zod";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { UnitSystem } from "@/lib/domain/units";
import { checkThresholds } from "@/lib/domain/rules/params";
import { ALERT_KINDS } from "@/lib/domain/vocabulary";
import { pushSubscriptionBody, pushUnsubscribeBody, meUpdate, settleBody } from "@/lib/domain/validation/alerts";
import { binCreateFor, binPatchFor, farmCreate, farmUpdate, zoneCreate, zoneUpdate } from "@/lib/domain/validation/farm";
import { probeCreate, probeUpdate } from "@/lib/domain/validation/probes";
import { invitationCreate, roleChange } from "@/lib/domain/validation/team";
import { ingredientCreate } from "@/lib/domain/validation/ingredients";
import { harvestCreateFor, noteCreate, sampleCreateFor, shiftCreateFor, wateringCreateFor } from "@/lib/domain/validation/log-entries";
import { feedingCreateFor } from "@/lib/domain/validation/logbook";
import { binRuleInput, rulePreviewInput } from "@/lib/domain/validation/rules";
import { configuredAllowList, endpointProblem } from "@/lib/server/push/push-policy";
import { errorBody, readJson, readOptionalJson } from "@/lib/web/errors";
import { signIn, type Session } from "../helpers/app";
import { addMember, makeFarm } from "../integration/series/fixtures";
import { count, expectClearError, hostileText, hostileValue, mutated, printTally, runs } from "./hostile";

type Ids = { farm: string; bin: string; zone: string; zone2: string; probe: number; alert: string; member: string };
type BodyRoute = {
  method: "POST" | "PUT" | "PATCH" | "DELETE";
  route: string; // file under app/api
  path: (i: Ids) => string;
  schema: (units: UnitSystem) => ZodType;
  sample: (i: Ids) => Record<string, unknown>;
  /** A check the use case makes after the schema (none throws: a Result). */
  after?: (parsed: unknown) => { ok: true } | { ok: false; error: { field: string; message: string } };
  optional?: true; // readOptionalJson: an empty body is no body
};

const same = (s: ZodType) => () => s;
const rulesAfter = (p: unknown) => {
  const v = p as { kind: (typeof ALERT_KINDS)[number]; thresholds: Record<string, unknown> };
  return checkThresholds(v.kind as Parameters<typeof checkThresholds>[0], v.thresholds);
};
const item = { name: "vegetable scraps", massKg: 2, moisturePct: 87, nitrogenPct: 2.7, cn: 19 };

// The routes whose handlers read a JSON body, in an order that leaves the farm usable to the end
// (the probe's PATCH may archive it, so it runs last).
const ROUTES: BodyRoute[] = [
  {
    method: "POST",
    route: "farms",
    path: () => "/api/farms",
    schema: same(farmCreate),
    sample: () => ({ name: "Zz fuzz farm", unitSystem: "metric", timezone: "UTC" }),
  },
  {
    method: "POST",
    route: "farms/[farmId]/bins",
    path: (i) => `/api/farms/${i.farm}/bins`,
    schema: binCreateFor,
    sample: () => ({ name: "Fuzz bin", style: "tote", species: "eisenia-fetida", zoneCount: 2, lengthCm: 60, widthCm: 40, depthCm: 30, notes: "lid" }),
  },
  {
    method: "POST",
    route: "farms/[farmId]/probes",
    path: (i) => `/api/farms/${i.farm}/probes`,
    schema: same(probeCreate),
    sample: (i) => ({ code: `fz-${Math.random().toString(36).slice(2, 9)}`, zoneId: i.zone, label: "corner", metrics: ["temperature"], reportIntervalS: 60 }),
  },
  {
    method: "POST",
    route: "farms/[farmId]/invitations",
    path: (i) => `/api/farms/${i.farm}/invitations`,
    schema: same(invitationCreate),
    sample: () => ({ email: `fuzz-${Math.random().toString(36).slice(2, 9)}@example.org`, role: "viewer" }),
  },
  {
    method: "POST",
    route: "farms/[farmId]/ingredients",
    path: (i) => `/api/farms/${i.farm}/ingredients`,
    schema: same(ingredientCreate),
    sample: () => ({
      name: `Grain ${Math.random().toString(36).slice(2, 7)}`,
      kind: "feedstock",
      moisturePct: 75,
      nitrogenPct: 4,
      cn: 12,
      source: "lab report",
    }),
  },
  {
    method: "POST",
    route: "bins/[binId]/zones",
    path: (i) => `/api/bins/${i.bin}/zones`,
    schema: same(zoneCreate),
    sample: () => ({ kind: "working", name: "Middle" }),
  },
  {
    method: "PATCH",
    route: "zones/[zoneId]",
    path: (i) => `/api/zones/${i.zone}`,
    schema: same(zoneUpdate),
    sample: () => ({ name: "North end" }),
  },
  {
    method: "POST",
    route: "bins/[binId]/feedings",
    path: (i) => `/api/bins/${i.bin}/feedings`,
    schema: feedingCreateFor,
    sample: (i) => ({ zoneId: i.zone, at: new Date(Date.now() - 3600_000).toISOString(), notes: "heavy", items: [item, { ...item, name: "cardboard" }] }),
  },
  {
    method: "POST",
    route: "bins/[binId]/waterings",
    path: (i) => `/api/bins/${i.bin}/waterings`,
    schema: wateringCreateFor,
    sample: (i) => ({ zoneId: i.zone, litres: 1.5, notes: "dry corner", at: new Date(Date.now() - 60_000).toISOString() }),
  },
  {
    method: "POST",
    route: "bins/[binId]/harvests",
    path: (i) => `/api/bins/${i.bin}/harvests`,
    schema: harvestCreateFor,
    sample: (i) => ({ zoneId: i.zone, massKg: 4, notes: "sieved" }),
  },
  {
    method: "POST",
    route: "bins/[binId]/notes",
    path: (i) => `/api/bins/${i.bin}/notes`,
    schema: same(noteCreate),
    sample: (i) => ({ zoneId: i.zone, text: "mites on the lid" }),
  },
  {
    method: "POST",
    route: "bins/[binId]/shifts",
    path: (i) => `/api/bins/${i.bin}/shifts`,
    schema: shiftCreateFor,
    sample: (i) => ({ zoneId: i.zone, toZoneId: i.zone2, volumeL: 10, notes: "to the curing side" }),
  },
  {
    method: "PUT",
    route: "bins/[binId]/rules",
    path: (i) => `/api/bins/${i.bin}/rules`,
    schema: same(binRuleInput),
    after: rulesAfter,
    sample: () => ({ kind: "heat", enabled: true, thresholds: { actNowAtC: 28 } }),
  },
  {
    method: "POST",
    route: "bins/[binId]/rules/preview",
    path: (i) => `/api/bins/${i.bin}/rules/preview`,
    schema: same(rulePreviewInput),
    after: rulesAfter,
    sample: () => ({ kind: "heat", enabled: true, thresholds: { headsUpAboveC: 24 } }),
  },
  {
    method: "POST",
    route: "probes/[probeId]/samples",
    path: (i) => `/api/probes/${i.probe}/samples`,
    schema: sampleCreateFor,
    sample: () => ({ wetMassG: 10, dryMassG: 2.3, tareG: 1, ovenTempC: 105, rawReading: 1234 }),
  },
  {
    method: "POST",
    route: "alerts/[alertId]/settle",
    path: (i) => `/api/alerts/${i.alert}/settle`,
    schema: same(settleBody),
    optional: true,
    sample: () => ({ note: "probe was out of the bed" }),
  },
  {
    method: "POST",
    route: "push/subscriptions",
    path: () => "/api/push/subscriptions",
    schema: same(pushSubscriptionBody),
    // lib/server/push/subscribe.ts checks the endpoint against the push services before saving it.
    after: (p) => {
      const problem = endpointProblem((p as { endpoint: string }).endpoint, configuredAllowList());
      return problem ? { ok: false, error: { field: "endpoint", message: problem } } : { ok: true };
    },
    sample: () => ({ endpoint: "https://fcm.googleapis.com/fcm/send/fuzz", keys: { p256dh: "B".repeat(87), auth: "A".repeat(22) } }),
  },
  {
    method: "DELETE",
    route: "push/subscriptions",
    path: () => "/api/push/subscriptions",
    schema: same(pushUnsubscribeBody),
    sample: () => ({ endpoint: "https://fcm.googleapis.com/fcm/send/fuzz" }),
  },
  {
    method: "PATCH",
    route: "me",
    path: () => "/api/me",
    schema: same(meUpdate),
    sample: () => ({ quietFrom: "22:00", quietTo: "06:30", timezone: "Europe/Dublin" }),
  },
  {
    method: "PATCH",
    route: "farms/[farmId]/members/[userId]",
    path: (i) => `/api/farms/${i.farm}/members/${i.member}`,
    schema: same(roleChange),
    sample: () => ({ role: "viewer" }),
  },
  {
    method: "PATCH",
    route: "bins/[binId]",
    path: (i) => `/api/bins/${i.bin}`,
    schema: binPatchFor,
    sample: () => ({ name: "Tote A", notes: "checked", lengthCm: 60, feedingIntervalDays: 7, plannedHarvestOn: "2027-01-10", archived: false }),
  },
  {
    method: "PATCH",
    route: "farms/[farmId]",
    path: (i) => `/api/farms/${i.farm}`,
    schema: same(farmUpdate),
    sample: () => ({ name: "Fuzz farm", timezone: "Europe/Dublin", feedingIntervalDays: 7 }),
  },
  {
    method: "PATCH",
    route: "probes/[probeId]",
    path: (i) => `/api/probes/${i.probe}`,
    schema: same(probeUpdate),
    sample: (i) => ({ zoneId: i.zone, label: "by the drain", metrics: ["temperature", "moisture"], reportIntervalS: 120, archived: false }),
  },
];

const FAKE: Ids = {
  farm: "00000000-0000-4000-8000-000000000001",
  bin: "00000000-0000-4000-8000-000000000002",
  zone: "00000000-0000-4000-8000-000000000003",
  zone2: "00000000-0000-4000-8000-000000000004",
  probe: 1,
  alert: "00000000-0000-4000-8000-000000000005",
  member: "00000000-0000-4000-8000-000000000006",
};

/** A request body: the sample changed at one place, any hostile JSON, or raw text that is no JSON body at all. */
const bodyFor = (r: BodyRoute, ids: Ids) =>
  fc.oneof(
    { weight: 8, arbitrary: mutated(r.sample(ids)).map((v) => ({ text: JSON.stringify(v) as string | Uint8Array, type: "application/json" })) },
    { weight: 1, arbitrary: fc.constant({ text: JSON.stringify(r.sample(ids)) as string | Uint8Array, type: "application/json" }) },
    { weight: 1, arbitrary: hostileValue.map((v) => ({ text: (JSON.stringify(v) ?? "") as string | Uint8Array, type: "application/json" })) },
    {
      weight: 2,
      arbitrary: fc
        .tuple(hostileText, fc.constantFrom("application/json", "application/json; charset=utf-8", "text/plain", "", "application/x-www-form-urlencoded"))
        .map(([text, type]) => ({ text, type })),
    },
  );

const asBody = (t: string | Uint8Array): BodyInit => (typeof t === "string" ? t : new Uint8Array(t));

// What a parsed body may hold on its way to PostgreSQL: no NUL or lone surrogate in a text, no
// number JSON and float8 cannot hold, no date outside 2000 to a day ahead.
function assertStorable(v: unknown, where = "body"): void {
  if (typeof v === "string") assert.doesNotMatch(v, /\u0000|\p{Cs}/u, `${where} holds a character PostgreSQL cannot store`);
  else if (typeof v === "number") assert.ok(Number.isFinite(v), `${where} is ${v}`);
  else if (v instanceof Date) assert.ok(v.getTime() >= Date.UTC(2000, 0, 1) && v.getTime() <= Date.now() + 86_400_000, `${where} is ${v.toISOString()}`);
  else if (Array.isArray(v)) v.forEach((x, i) => assertStorable(x, `${where}.${i}`));
  else if (v && typeof v === "object") for (const [k, x] of Object.entries(v)) assertStorable(x, `${where}.${k}`);
}

describe("API bodies, in process: reader, schema and the use case's own checks", () => {
  const perRoute = Math.ceil(10_000 / ROUTES.length);
  it.each(ROUTES.map((r, n) => ({ ...r, n, name: `${r.method} ${r.route}` })))("$name answers every body with its value or a clear 4xx", async (r) => {
    for (const units of ["metric", "imperial"] as const) {
      const schema = r.schema(units);
      await fc.assert(
        fc.asyncProperty(bodyFor(r, FAKE), async ({ text, type }) => {
          count("api bodies in process");
          const req = new Request("http://127.0.0.1/api/x", { method: r.method, headers: type ? { "content-type": type } : {}, body: asBody(text) });
          try {
            const parsed = schema.parse(r.optional ? await readOptionalJson(req) : await readJson(req));
            const checked = r.after?.(parsed);
            if (checked && !checked.ok) assert.ok(checked.error.message.length > 5 && checked.error.field.length > 0);
            else assertStorable(parsed);
          } catch (err) {
            if (err instanceof assert.AssertionError) throw err;
            const { status, body } = errorBody(err);
            assert.ok(status >= 400 && status < 500, `${status} for ${String(text).slice(0, 200)}: ${(err as Error).stack}`);
            assert.ok(body.error.message.trim().length > 5, body.error.message);
            if (err instanceof ZodError) assert.equal(status, 422);
          }
        }),
        runs(Math.ceil(perRoute / 2), 100 + r.n * 2 + (units === "metric" ? 0 : 1)),
      );
    }
  });

  it("every route that reads a JSON body is in the table", () => {
    const root = path.resolve(import.meta.dirname, "../../app/api");
    const files = (fs.readdirSync(root, { recursive: true }) as string[]).filter((f) => path.basename(f) === "route.ts");
    const reading = files.filter((f) => /readJson\(|readOptionalJson\(/.test(fs.readFileSync(path.join(root, f), "utf8"))).map((f) => path.dirname(f));
    expect(new Set(ROUTES.map((r) => r.route))).toEqual(new Set(reading));
  });
});

describe("API bodies, over the network to the running app", () => {
  let c: pg.Client;
  let owner: Session;
  let ids: Ids;
  const emails: string[] = [];

  beforeAll(async () => {
    c = new pg.Client({ connectionString: inject("appDbUrl") });
    await c.connect();
    const farm = await makeFarm(c, { zones: ["fresh", "working", "curing"], name: "Zz Fuzz bodies" });
    const email = await addMember(c, farm.farmId, "owner", "fuzz-bodies-pass");
    emails.push(email, await addMember(c, farm.farmId, "keeper", "fuzz-bodies-pass"));
    owner = await signIn(email, "fuzz-bodies-pass");
    const member = await c.query(`select user_id from memberships m join users u on u.id = m.user_id where u.email = $1`, [emails[1]]);
    const alert = await c.query(
      `insert into alerts (farm_id, bin_id, zone_id, kind, level, subject, message) values ($1, $2, $3, 'heat', 'heads_up', $4, 'fuzz alert') returning id`,
      [farm.farmId, farm.binId, farm.zones.fresh, `zone:${farm.zones.fresh}:heat`],
    );
    ids = {
      farm: farm.farmId,
      bin: farm.binId,
      zone: farm.zones.fresh!,
      zone2: farm.zones.curing!,
      probe: farm.probes[0]!.id,
      alert: alert.rows[0].id,
      member: member.rows[0].user_id,
    };
  });
  afterAll(async () => {
    if (c) {
      const mine = await c.query(`select farm_id from memberships m join users u on u.id = m.user_id where u.email = any($1)`, [emails]);
      await c.query(`delete from farms where id = any($1)`, [mine.rows.map((r) => r.farm_id)]);
      await c.query(`delete from users where email = any($1)`, [emails]);
      await c.end();
    }
    printTally("api-bodies");
  });

  it.each(ROUTES.map((r, n) => ({ ...r, n, name: `${r.method} ${r.route}` })))("$name answers 2xx or a clear 4xx, never a 500", async (r) => {
    await fc.assert(
      fc.asyncProperty(bodyFor(r, ids), async ({ text, type }) => {
        count("api bodies over the network");
        const res = await owner.fetch(r.path(ids), { method: r.method, headers: type ? { "content-type": type } : {}, body: asBody(text) });
        const answer = await res.text();
        const context = `${r.method} ${r.path(ids)} ${String(text).slice(0, 300)} → ${res.status} ${answer.slice(0, 300)}`;
        expect(res.status, context).toBeLessThan(500);
        if (res.status >= 400) expectClearError(res.status, JSON.parse(answer), context);
      }),
      runs(10, 300 + r.n),
    );
  });

  it("the app still answers after all of it", async () => {
    expect((await owner.fetch("/api/me")).status).toBe(200);
  });
});
