// Walks every route handler under app/api: each role allowed or refused as designed, signed out
// gets 401, another farm's ids get 404. A route added without a row here fails the last test.
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { anonymous, signIn, type Session } from "../../helpers/app";
import { newSubscriber } from "../../helpers/push";
import { hashPassword } from "@/lib/server/auth/password";

type Role = "owner" | "keeper" | "viewer";
type Ids = { farm: string; bin: string; zone: string; zone2: string; alert: string; probe: number };
type Row = {
  method: "GET" | "POST" | "PUT" | "PATCH" | "DELETE";
  route: string; // file path under app/api, e.g. "farms/[farmId]/bins"
  path: (ids: Ids) => string;
  body?: (ids: Ids) => unknown;
  setup?: (s: Session) => Promise<void>;
  allowed: Role[];
  farmScoped: boolean;
  last?: boolean; // runs after the others: it changes the caller's roles
};

const ALL: Role[] = ["owner", "keeper", "viewer"];
const OWNER: Role[] = ["owner"];
const CREW: Role[] = ["owner", "keeper"];

async function newSubscription() {
  return (await newSubscriber()).json;
}
const feeding = () => ({ items: [{ name: "vegetable scraps", massKg: 2, moisturePct: 87, nitrogenPct: 2.7, cn: 19 }] });
const newBin = () => ({ name: `Scratch ${Math.random().toString(36).slice(2, 7)}`, style: "tote", species: "eisenia-fetida", zoneCount: 2 });

const rows: Row[] = [
  { method: "GET", route: "me", path: () => "/api/me", allowed: ALL, farmScoped: false },
  { method: "GET", route: "farms", path: () => "/api/farms", allowed: ALL, farmScoped: false },
  { method: "GET", route: "me/data", path: () => "/api/me/data", allowed: ALL, farmScoped: false },
  { method: "POST", route: "farms", path: () => "/api/farms", body: () => ({ name: "Zz farm of my own" }), allowed: ALL, farmScoped: false, last: true },
  { method: "GET", route: "farms/[farmId]", path: (i) => `/api/farms/${i.farm}`, allowed: ALL, farmScoped: true },
  {
    method: "PATCH",
    route: "farms/[farmId]",
    path: (i) => `/api/farms/${i.farm}`,
    body: () => ({ timezone: "Europe/Dublin" }),
    allowed: OWNER,
    farmScoped: true,
  },
  { method: "GET", route: "farms/[farmId]/today", path: (i) => `/api/farms/${i.farm}/today`, allowed: ALL, farmScoped: true },
  { method: "GET", route: "farms/[farmId]/bins", path: (i) => `/api/farms/${i.farm}/bins`, allowed: ALL, farmScoped: true },
  { method: "POST", route: "farms/[farmId]/bins", path: (i) => `/api/farms/${i.farm}/bins`, body: newBin, allowed: OWNER, farmScoped: true },
  { method: "GET", route: "bins/[binId]", path: (i) => `/api/bins/${i.bin}`, allowed: ALL, farmScoped: true },
  { method: "PATCH", route: "bins/[binId]", path: (i) => `/api/bins/${i.bin}`, body: () => ({ notes: "checked" }), allowed: OWNER, farmScoped: true },
  { method: "DELETE", route: "bins/[binId]", path: (i) => `/api/bins/${i.bin}`, allowed: OWNER, farmScoped: true },
  { method: "GET", route: "bins/[binId]/zones", path: (i) => `/api/bins/${i.bin}/zones`, allowed: ALL, farmScoped: true },
  { method: "POST", route: "bins/[binId]/zones", path: (i) => `/api/bins/${i.bin}/zones`, body: () => ({ kind: "working" }), allowed: OWNER, farmScoped: true },
  { method: "GET", route: "zones/[zoneId]", path: (i) => `/api/zones/${i.zone}`, allowed: ALL, farmScoped: true },
  { method: "PATCH", route: "zones/[zoneId]", path: (i) => `/api/zones/${i.zone}`, body: () => ({ name: "North end" }), allowed: OWNER, farmScoped: true },
  { method: "DELETE", route: "zones/[zoneId]", path: (i) => `/api/zones/${i.zone}`, allowed: OWNER, farmScoped: true },
  { method: "PATCH", route: "me", path: () => "/api/me", body: () => ({ quietFrom: "22:00", quietTo: "06:30" }), allowed: ALL, farmScoped: false },
  { method: "GET", route: "farms/[farmId]/alerts", path: (i) => `/api/farms/${i.farm}/alerts?state=all`, allowed: ALL, farmScoped: true },
  { method: "GET", route: "alerts/[alertId]", path: (i) => `/api/alerts/${i.alert}`, allowed: ALL, farmScoped: true },
  { method: "POST", route: "alerts/[alertId]/claim", path: (i) => `/api/alerts/${i.alert}/claim`, allowed: CREW, farmScoped: true },
  {
    method: "POST",
    route: "alerts/[alertId]/release",
    path: (i) => `/api/alerts/${i.alert}/release`,
    // The scratch alert made just before is the demo farm's newest: claimed, so there is a claim to release.
    setup: async () => {
      await db.query(
        `update alerts set state = 'claimed', claimed_at = now() where id = (select id from alerts where farm_id = $1 order by raised_at desc, id desc limit 1)`,
        [demoFarm],
      );
    },
    allowed: CREW,
    farmScoped: true,
  },
  {
    method: "POST",
    route: "alerts/[alertId]/settle",
    path: (i) => `/api/alerts/${i.alert}/settle`,
    body: () => ({ note: "probe was out of the bed" }),
    allowed: CREW,
    farmScoped: true,
  },
  { method: "GET", route: "bins/[binId]/feedings", path: (i) => `/api/bins/${i.bin}/feedings`, allowed: ALL, farmScoped: true },
  { method: "POST", route: "bins/[binId]/feedings", path: (i) => `/api/bins/${i.bin}/feedings`, body: feeding, allowed: CREW, farmScoped: true },
  { method: "GET", route: "farms/[farmId]/ingredients", path: (i) => `/api/farms/${i.farm}/ingredients`, allowed: ALL, farmScoped: true },
  {
    method: "POST",
    route: "farms/[farmId]/ingredients",
    path: (i) => `/api/farms/${i.farm}/ingredients`,
    body: () => ({
      name: `Spent grain ${Math.random().toString(36).slice(2, 7)}`,
      kind: "feedstock",
      moisturePct: 75,
      nitrogenPct: 4,
      cn: 12,
      source: "our lab report, March",
    }),
    allowed: CREW,
    farmScoped: true,
  },
  { method: "GET", route: "bins/[binId]/rules", path: (i) => `/api/bins/${i.bin}/rules`, allowed: ALL, farmScoped: true },
  {
    method: "PUT",
    route: "bins/[binId]/rules",
    path: (i) => `/api/bins/${i.bin}/rules`,
    body: () => ({ kind: "heat", thresholds: { actNowAtC: 28 } }),
    allowed: OWNER,
    farmScoped: true,
  },
  { method: "DELETE", route: "bins/[binId]/rules", path: (i) => `/api/bins/${i.bin}/rules?kind=heat`, allowed: OWNER, farmScoped: true },
  {
    method: "POST",
    route: "bins/[binId]/rules/preview",
    path: (i) => `/api/bins/${i.bin}/rules/preview`,
    body: () => ({ kind: "heat", thresholds: { headsUpAboveC: 24 } }),
    allowed: OWNER,
    farmScoped: true,
  },
  { method: "GET", route: "farms/[farmId]/probes", path: (i) => `/api/farms/${i.farm}/probes`, allowed: ALL, farmScoped: true },
  {
    method: "POST",
    route: "farms/[farmId]/probes",
    path: (i) => `/api/farms/${i.farm}/probes`,
    body: () => ({ code: `new-${Math.random().toString(36).slice(2, 9)}` }),
    allowed: OWNER,
    farmScoped: true,
  },
  {
    method: "PATCH",
    route: "probes/[probeId]",
    path: (i) => `/api/probes/${i.probe}`,
    body: () => ({ label: "by the drain" }),
    allowed: OWNER,
    farmScoped: true,
  },
  { method: "POST", route: "probes/[probeId]/token", path: (i) => `/api/probes/${i.probe}/token`, allowed: OWNER, farmScoped: true },
  { method: "GET", route: "push/key", path: () => "/api/push/key", allowed: ALL, farmScoped: false },
  {
    method: "POST",
    route: "push/subscriptions",
    path: () => "/api/push/subscriptions",
    body: () => lastSub,
    setup: async () => {
      lastSub = await newSubscription();
    },
    allowed: CREW,
    farmScoped: false,
  },
  {
    method: "DELETE",
    route: "push/subscriptions",
    path: () => "/api/push/subscriptions",
    body: () => ({ endpoint: lastSub?.endpoint }),
    setup: async (s) => {
      lastSub = await newSubscription();
      await s.fetch("/api/push/subscriptions", { method: "POST", json: lastSub });
    },
    allowed: CREW,
    farmScoped: false,
  },
  {
    method: "POST",
    route: "push/test",
    path: () => "/api/push/test",
    setup: async (s) => {
      await s.fetch("/api/push/subscriptions", { method: "POST", json: await newSubscription() });
    },
    allowed: CREW,
    farmScoped: false,
  },
  { method: "GET", route: "farms/[farmId]/imports", path: (i) => `/api/farms/${i.farm}/imports`, allowed: ALL, farmScoped: true },
  { method: "POST", route: "farms/[farmId]/imports", path: (i) => `/api/farms/${i.farm}/imports`, body: () => csvImport(), allowed: OWNER, farmScoped: true },
  { method: "GET", route: "zones/[zoneId]/series", path: (i) => `/api/zones/${i.zone}/series?metric=temperature`, allowed: ALL, farmScoped: true },
  { method: "GET", route: "bins/[binId]/series", path: (i) => `/api/bins/${i.bin}/series?metric=temperature`, allowed: ALL, farmScoped: true },
  // Another farm's probe gets 404: tests/integration/series/.
  { method: "GET", route: "probes/[probeId]/health", path: (i) => `/api/probes/${i.probe}/health`, allowed: ALL, farmScoped: true },
  { method: "GET", route: "probes/[probeId]/series", path: (i) => `/api/probes/${i.probe}/series?metric=temperature`, allowed: ALL, farmScoped: true },
  // The team (behaviour, the last owner and invitation links: tests/integration/team/).
  { method: "GET", route: "farms/[farmId]/members", path: (i) => `/api/farms/${i.farm}/members`, allowed: ALL, farmScoped: true },
  {
    method: "PATCH",
    route: "farms/[farmId]/members/[userId]",
    path: (i) => `/api/farms/${i.farm}/members/${scratchMember}`,
    body: () => ({ role: "viewer" }),
    setup: async () => {
      scratchMember = await newMember();
    },
    allowed: OWNER,
    farmScoped: true,
  },
  {
    method: "DELETE",
    route: "farms/[farmId]/members/[userId]",
    path: (i) => `/api/farms/${i.farm}/members/${scratchMember}`,
    setup: async () => {
      scratchMember = await newMember();
    },
    allowed: OWNER,
    farmScoped: true,
  },
  { method: "GET", route: "farms/[farmId]/invitations", path: (i) => `/api/farms/${i.farm}/invitations`, allowed: OWNER, farmScoped: true },
  {
    method: "POST",
    route: "farms/[farmId]/invitations",
    path: (i) => `/api/farms/${i.farm}/invitations`,
    body: () => ({ email: `invitee-${Math.random().toString(36).slice(2, 9)}@example.org`, role: "keeper" }),
    allowed: OWNER,
    farmScoped: true,
  },
  {
    method: "DELETE",
    route: "farms/[farmId]/invitations/[invitationId]",
    path: (i) => `/api/farms/${i.farm}/invitations/${scratchInvitation}`,
    setup: async () => {
      scratchInvitation = await newInvitation();
    },
    allowed: OWNER,
    farmScoped: true,
  },
  // The rest of the logbook (behaviour: tests/integration/logbook/).
  { method: "GET", route: "bins/[binId]/waterings", path: (i) => `/api/bins/${i.bin}/waterings`, allowed: ALL, farmScoped: true },
  {
    method: "POST",
    route: "bins/[binId]/waterings",
    path: (i) => `/api/bins/${i.bin}/waterings`,
    body: () => ({ litres: 1.5 }),
    allowed: CREW,
    farmScoped: true,
  },
  { method: "GET", route: "bins/[binId]/harvests", path: (i) => `/api/bins/${i.bin}/harvests`, allowed: ALL, farmScoped: true },
  { method: "POST", route: "bins/[binId]/harvests", path: (i) => `/api/bins/${i.bin}/harvests`, body: () => ({ massKg: 4 }), allowed: CREW, farmScoped: true },
  { method: "GET", route: "bins/[binId]/notes", path: (i) => `/api/bins/${i.bin}/notes`, allowed: ALL, farmScoped: true },
  {
    method: "POST",
    route: "bins/[binId]/notes",
    path: (i) => `/api/bins/${i.bin}/notes`,
    body: () => ({ text: "mites on the lid" }),
    allowed: CREW,
    farmScoped: true,
  },
  { method: "GET", route: "bins/[binId]/logbook", path: (i) => `/api/bins/${i.bin}/logbook`, allowed: ALL, farmScoped: true },
  { method: "GET", route: "bins/[binId]/shifts", path: (i) => `/api/bins/${i.bin}/shifts`, allowed: ALL, farmScoped: true },
  {
    method: "POST",
    route: "bins/[binId]/shifts",
    path: (i) => `/api/bins/${i.bin}/shifts`,
    body: (i) => ({ zoneId: i.zone, toZoneId: i.zone2, volumeL: 10 }),
    allowed: CREW,
    farmScoped: true,
  },
  { method: "GET", route: "farms/[farmId]/logbook", path: (i) => `/api/farms/${i.farm}/logbook?kind=note`, allowed: ALL, farmScoped: true },
  {
    method: "GET",
    route: "farms/[farmId]/logbook/export",
    path: (i) => `/api/farms/${i.farm}/logbook/export?format=csv&bin=${i.bin}`,
    allowed: ALL,
    farmScoped: true,
  },
  {
    method: "GET",
    route: "farms/[farmId]/readings/export",
    path: (i) => `/api/farms/${i.farm}/readings/export?zoneId=${i.zone}&from=2025-05-01&to=2025-05-02`,
    allowed: ALL,
    farmScoped: true,
  },
  {
    method: "DELETE",
    route: "logbook/[kind]/[entryId]",
    path: (i) => `/api/logbook/note/${i.farm === other?.farm ? otherEntry : scratchEntry}`,
    setup: async (s) => {
      await newEntry(s);
    },
    allowed: CREW,
    farmScoped: true,
  },
  { method: "GET", route: "probes/[probeId]/samples", path: (i) => `/api/probes/${i.probe}/samples`, allowed: ALL, farmScoped: true },
  {
    method: "POST",
    route: "probes/[probeId]/samples",
    path: (i) => `/api/probes/${i.probe}/samples`,
    body: () => ({ wetMassG: 10, dryMassG: 2.3, rawReading: 450 }),
    allowed: CREW,
    farmScoped: true,
  },
  { method: "GET", route: "probes/[probeId]/calibration", path: (i) => `/api/probes/${i.probe}/calibration`, allowed: ALL, farmScoped: true },
  {
    method: "POST",
    route: "probes/[probeId]/calibration",
    path: (i) => `/api/probes/${i.probe}/calibration`,
    setup: async () => {
      await samplesForNewestProbe();
    },
    allowed: OWNER,
    farmScoped: true,
  },
  { method: "DELETE", route: "probes/[probeId]/calibration", path: (i) => `/api/probes/${i.probe}/calibration`, allowed: OWNER, farmScoped: true },
];
// A note to undo: logged by the caller itself (by the owner when the caller may not log), on a bin
// of its own; and once, a note on the other farm for the 404 check.
let scratchEntry = "00000000-0000-4000-8000-000000000000";
let otherEntry = "00000000-0000-4000-8000-000000000000";
async function newEntry(s: Session) {
  const ids = await scratch(sessions.owner, demoFarm);
  let res = await s.fetch(`/api/bins/${ids.bin}/notes`, { method: "POST", json: { text: "to undo" } });
  if (res.status === 403) res = await sessions.owner.fetch(`/api/bins/${ids.bin}/notes`, { method: "POST", json: { text: "to undo" } });
  scratchEntry = ((await res.json()) as { note: { id: string } }).note.id;
  if (otherEntry.startsWith("00000000")) {
    otherEntry = (await db.query(`insert into log_notes (farm_id, bin_id, text) values ($1, $2, 'other farm') returning id`, [other.farm, other.bin])).rows[0]
      .id;
  }
}
// setup runs right after scratch() made the row's probe, so the demo farm's newest probe is that one:
// two samples at different raw readings let the owner's fit succeed.
async function samplesForNewestProbe() {
  const p = (
    await db.query(`select p.id, p.zone_id, z.bin_id from probes p join zones z on z.id = p.zone_id where p.farm_id = $1 order by p.id desc limit 1`, [
      demoFarm,
    ])
  ).rows[0];
  await db.query(
    `insert into oven_dry_samples (farm_id, bin_id, zone_id, probe_id, wet_mass_g, dry_mass_g, raw_reading, moisture_wb_pct) values ($1, $2, $3, $4, 10, 3, 400, 70), ($1, $2, $3, $4, 10, 4, 500, 60)`,
    [demoFarm, p.bin_id, p.zone_id, p.id],
  );
}
let lastSub: Awaited<ReturnType<typeof newSubscription>> | null = null;
// A keeper and an open invitation of the demo farm, made afresh for each row that changes one.
let scratchMember = "00000000-0000-4000-8000-000000000000";
let scratchInvitation = "00000000-0000-4000-8000-000000000000";
async function newMember() {
  const u = await db.query(`insert into users (email, name, password_hash) values ($1, 'Scratch Keeper', 'x') returning id`, [
    `scratch-${Math.random().toString(36).slice(2, 10)}@example.org`,
  ]);
  await db.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'keeper')`, [u.rows[0].id, demoFarm]);
  return u.rows[0].id as string;
}
async function newInvitation() {
  const r = await db.query(
    `insert into invitations (farm_id, email, role, token_hash, expires_at) values ($1, $2, 'viewer', $3, now() + interval '1 day') returning id`,
    [demoFarm, `scratch-${Math.random().toString(36).slice(2, 10)}@example.org`, `scratch-${Math.random()}`],
  );
  return r.rows[0].id as string;
}
// A file of one row for a probe no farm has: a new file each call (its time differs), nothing stored.
const csvImport = () => ({
  fileName: "scratch.csv",
  csv: `time,probe,metric,value\n${new Date().toISOString()},no-such-probe,temperature,21\n`,
  mapping: { time: "time", probe: "probe", metric: "metric", value: "value" },
});

// Routes outside the farm model: next-auth's own handler; probes posting readings with their own
// credentials (tests/integration/ingest-http/).
const EXEMPT = new Set(["auth/[...nextauth]", "ingest"]);

// Every way a route file can export a handler: `export const GET = …`, `export async function GET`,
// `export function GET`, a factory's `export const { GET, POST } = …`, and `export { GET } from …`.
const METHOD = /^(GET|POST|PUT|PATCH|DELETE|HEAD|OPTIONS)$/;
export function exportedMethods(src: string): string[] {
  const names: string[] = [];
  for (const m of src.matchAll(/export\s+(?:const|let|var|(?:async\s+)?function\*?)\s+([A-Z]+)\b/g)) names.push(m[1]!);
  for (const m of src.matchAll(/export\s+(?:const|let|var)\s*\{([^}]+)\}/g)) names.push(...m[1]!.split(",").map((x) => x.split(":").pop()!.trim()));
  for (const m of src.matchAll(/export\s*\{([^}]+)\}/g))
    names.push(
      ...m[1]!.split(",").map((x) =>
        x
          .split(/\s+as\s+/)
          .pop()!
          .trim(),
      ),
    );
  return [...new Set(names.filter((n) => METHOD.test(n)))];
}

const sessions = {} as Record<Role, Session>;
let db: pg.Client;
let demoFarm: string;
let other: Ids;

async function scratch(owner: Session, farm: string): Promise<Ids> {
  const res = await owner.fetch(`/api/farms/${farm}/bins`, { method: "POST", json: newBin() });
  expect(res.status).toBe(201);
  const { bin } = (await res.json()) as { bin: { id: string; zones: { id: string }[] } };
  const a = await db.query(
    `insert into alerts (farm_id, bin_id, zone_id, kind, level, subject, message) values ($1, $2, $3, 'heat', 'heads_up', $4, 'test alert') returning id`,
    [farm, bin.id, bin.zones[0]!.id, `zone:${bin.zones[0]!.id}:heat`],
  );
  const p = await db.query(`insert into probes (farm_id, zone_id, code, token_hash) values ($1, $2, $3, 'x') returning id`, [
    farm,
    bin.zones[0]!.id,
    `auth-${Math.random().toString(36).slice(2, 10)}`,
  ]);
  return { farm, bin: bin.id, zone: bin.zones[0]!.id, zone2: bin.zones[1]!.id, alert: a.rows[0].id, probe: p.rows[0].id };
}

beforeAll(async () => {
  db = new pg.Client({ connectionString: inject("appDbUrl") });
  await db.connect();
  sessions.owner = await signIn("noor@alder-row.example", "alder-row-demo");
  sessions.keeper = await signIn("tomas@alder-row.example", "alder-row-demo");
  // A farm of this file's own, with the demo owner and keeper in their demo roles: the hundreds of
  // scratch bins made below stay out of the demo farm the browser tests look at.
  const owner = (await db.query(`select id from users where email = 'noor@alder-row.example'`)).rows[0].id;
  const keeper = (await db.query(`select id from users where email = 'tomas@alder-row.example'`)).rows[0].id;
  demoFarm = (await db.query(`insert into farms (name) values ('Zz Authorization Test Farm') returning id`)).rows[0].id;
  await db.query(`insert into memberships (user_id, farm_id, role) values ($1, $3, 'owner'), ($2, $3, 'keeper')`, [owner, keeper, demoFarm]);
  const hash = await hashPassword("other-farm-pass");
  // A viewer of this file's own: "POST /api/farms" below makes the caller an owner of a new farm,
  // so the demo viewer would not stay a viewer everywhere.
  const viewerEmail = `viewer-${Date.now()}@example.org`;
  const v = await db.query(`insert into users (email, name, password_hash) values ($1, 'Viewer Only', $2) returning id`, [viewerEmail, hash]);
  await db.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'viewer')`, [v.rows[0].id, demoFarm]);
  sessions.viewer = await signIn(viewerEmail, "other-farm-pass");
  // A second farm whose owner is nobody of the demo farm.
  const email = `other-${Date.now()}@example.org`;
  const u = await db.query(`insert into users (email, name, password_hash) values ($1, 'Other Owner', $2) returning id`, [email, hash]);
  const f = await db.query(`insert into farms (name) values ('Other Farm') returning id`);
  await db.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'owner')`, [u.rows[0].id, f.rows[0].id]);
  other = await scratch(await signIn(email, "other-farm-pass"), f.rows[0].id);
});

afterAll(async () => {
  await db?.end();
});

describe("every route handler checks the session and the role", () => {
  for (const row of [...rows.filter((r) => !r.last), ...rows.filter((r) => r.last)]) {
    describe(`${row.method} /api/${row.route}`, () => {
      it("signed out gets 401", async () => {
        const ids = await scratch(sessions.owner, demoFarm);
        const res = await anonymous().fetch(row.path(ids), { method: row.method, json: row.body?.(ids) });
        expect(res.status).toBe(401);
        expect(((await res.json()) as { error: { code: string } }).error.code).toBe("unauthenticated");
      });

      for (const role of ["viewer", "keeper", "owner"] as Role[]) {
        const allowed = row.allowed.includes(role);
        it(`${role} ${allowed ? "is allowed" : "gets 403"}`, async () => {
          const ids = await scratch(sessions.owner, demoFarm);
          await row.setup?.(sessions[role]);
          const res = await sessions[role].fetch(row.path(ids), { method: row.method, json: row.body?.(ids) });
          if (allowed) expect(res.status, await res.clone().text()).toBeLessThan(300);
          else {
            expect(res.status).toBe(403);
            expect(((await res.json()) as { error: { code: string } }).error.code).toBe("forbidden");
          }
        });
      }

      if (row.farmScoped) {
        it("another farm's ids get 404, even for an owner", async () => {
          for (const role of ALL) {
            const res = await sessions[role].fetch(row.path(other), { method: row.method, json: row.body?.(other) });
            expect(res.status, `${role}`).toBe(404);
          }
        });
      }
    });
  }

  it("a refused write changes nothing", async () => {
    const ids = await scratch(sessions.owner, demoFarm);
    await sessions.viewer.fetch(`/api/bins/${ids.bin}`, { method: "DELETE" });
    await sessions.keeper.fetch(`/api/bins/${ids.bin}`, { method: "PATCH", json: { name: "renamed by keeper" } });
    const r = await db.query(`select name, archived_at from bins where id = $1`, [ids.bin]);
    expect(r.rows[0].archived_at).toBeNull();
    expect(r.rows[0].name).not.toBe("renamed by keeper");
  });

  it("the route finder sees every way of exporting a handler", () => {
    const src = [
      "export const GET = route(async () => Response.json({}));",
      "export async function POST(req: Request) { return new Response(); }",
      "export function PUT() { return new Response(); }",
      "export const { PATCH, DELETE: remove } = makeRoutes();",
      'export { HEAD } from "./other";',
      "export async function getThing() {}",
    ].join("\n");
    expect(exportedMethods(src).sort()).toEqual(["GET", "HEAD", "PATCH", "POST", "PUT"]);
  });

  it("the table covers every route file and method under app/api", () => {
    const apiDir = path.resolve(import.meta.dirname, "../../../app/api");
    const found: string[] = [];
    const walk = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (e.name === "route.ts") {
          const rel = path.relative(apiDir, dir);
          if (EXEMPT.has(rel)) continue;
          for (const method of exportedMethods(fs.readFileSync(p, "utf8"))) found.push(`${method} ${rel}`);
        }
      }
    };
    walk(apiDir);
    const covered = new Set(rows.map((r) => `${r.method} ${r.route}`));
    expect(found.filter((f) => !covered.has(f))).toEqual([]);
  });
});

describe("input is validated and errors name the field", () => {
  it("a bin with seven zones is refused with the field at fault", async () => {
    const res = await sessions.owner.fetch(`/api/farms/${demoFarm}/bins`, { method: "POST", json: { ...newBin(), zoneCount: 7 } });
    expect(res.status).toBe(422);
    const body = (await res.json()) as { error: { code: string; field: string; message: string } };
    expect(body.error).toMatchObject({ code: "invalid", field: "zoneCount" });
    expect(body.error.message).toMatch(/at most 6/);
  });

  it("an unknown species is refused with the field at fault", async () => {
    const res = await sessions.owner.fetch(`/api/farms/${demoFarm}/bins`, { method: "POST", json: { ...newBin(), species: "lumbricus-terrestris" } });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { error: { field: string } }).error.field).toBe("species");
  });

  it("a body that is not JSON gets 400", async () => {
    const res = await sessions.owner.fetch(`/api/farms/${demoFarm}/bins`, {
      method: "POST",
      body: "{not json",
      headers: { "content-type": "application/json" },
    });
    expect(res.status).toBe(400);
  });

  it("a malformed id gets 404, not 500", async () => {
    const res = await sessions.owner.fetch(`/api/bins/not-a-uuid`);
    expect(res.status).toBe(404);
  });
});
