// What the crew may do with an alert over HTTP, and what a page shows to whom: a viewer reads but
// cannot claim, release or settle; a keeper of one farm can neither see nor change another farm's
// alert; claim, release and settle each leave their event, the settle with its note.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { signIn, type Session } from "../../helpers/app";
import { hashPassword } from "@/lib/server/auth/password";

let db: pg.Client;
const farms = {} as Record<"a" | "b", { farm: string; bin: string; zone: string }>;
const people = {} as Record<"keeperA" | "viewerA" | "keeperB", Session>;
const PASSWORD = "crew-alert-test-pass";

async function farmWithZone(name: string) {
  const farm = (await db.query(`insert into farms (name) values ($1) returning id`, [name])).rows[0].id as string;
  const bin = (await db.query(`insert into bins (farm_id, name, style, species) values ($1, 'Test Bed', 'bed', 'eisenia-fetida') returning id`, [farm])).rows[0]
    .id as string;
  const zone = (await db.query(`insert into zones (bin_id, position, kind) values ($1, 0, 'fresh') returning id`, [bin])).rows[0].id as string;
  return { farm, bin, zone };
}

async function person(role: "keeper" | "viewer", farm: string, hash: string) {
  const email = `${role}-${Math.random().toString(36).slice(2, 10)}@example.org`;
  const u = await db.query(`insert into users (email, name, password_hash) values ($1, $2, $3) returning id`, [email, `Test ${role}`, hash]);
  await db.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, $3)`, [u.rows[0].id, farm, role]);
  return signIn(email, PASSWORD);
}

async function openAlert(f: { farm: string; bin: string; zone: string }) {
  const r = await db.query(
    `insert into alerts (farm_id, bin_id, zone_id, kind, level, subject, message, value) values ($1, $2, $3, 'heat', 'act_now', $4, 'Test Bed, fresh zone: 31.0 °C', 31) returning id`,
    [f.farm, f.bin, f.zone, `zone:${f.zone}:heat:${Math.random()}`],
  );
  return r.rows[0].id as string;
}

const post = (s: Session, alert: string, action: "claim" | "release" | "settle", json?: unknown) =>
  s.fetch(`/api/alerts/${alert}/${action}`, { method: "POST", json: json ?? {} });
const stateOf = async (id: string) =>
  (await db.query(`select state, claimed_by from alerts where id = $1`, [id])).rows[0] as { state: string; claimed_by: string | null };
const eventsOf = async (id: string) =>
  (await db.query(`select type, detail from alert_events where alert_id = $1 order by at, id`, [id])).rows as {
    type: string;
    detail: Record<string, unknown>;
  }[];

beforeAll(async () => {
  db = new pg.Client({ connectionString: inject("appDbUrl") });
  await db.connect();
  const hash = await hashPassword(PASSWORD);
  farms.a = await farmWithZone("Zz Crew Test Farm A");
  farms.b = await farmWithZone("Zz Crew Test Farm B");
  people.keeperA = await person("keeper", farms.a.farm, hash);
  people.viewerA = await person("viewer", farms.a.farm, hash);
  people.keeperB = await person("keeper", farms.b.farm, hash);
});
afterAll(async () => {
  await db.query(`delete from farms where id = any($1::uuid[])`, [[farms.a.farm, farms.b.farm]]);
  await db.end();
});

describe("claim, release and settle from the alert's page", () => {
  it("a viewer gets 403 on claim, release and settle, and the alert is unchanged", async () => {
    const id = await openAlert(farms.a);
    for (const action of ["claim", "settle"] as const) {
      const res = await post(people.viewerA, id, action, action === "settle" ? { note: "not mine to settle" } : undefined);
      expect(res.status, action).toBe(403);
      expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/viewer cannot/);
    }
    expect(await stateOf(id)).toMatchObject({ state: "raised", claimed_by: null });
    expect((await post(people.keeperA, id, "claim")).status).toBe(200);
    expect((await post(people.viewerA, id, "release")).status).toBe(403);
    expect((await stateOf(id)).state).toBe("claimed");
    expect((await eventsOf(id)).map((e) => e.type)).toEqual(["claimed"]);
  });

  it("a keeper claims, releases the claim, and settles with a note; each step is an event", async () => {
    const id = await openAlert(farms.a);
    expect((await post(people.keeperA, id, "claim")).status).toBe(200);
    const released = await post(people.keeperA, id, "release");
    expect(released.status).toBe(200);
    expect(await stateOf(id)).toMatchObject({ state: "raised", claimed_by: null });
    // Nothing left to release: a plain refusal, not a silent success.
    const again = await post(people.keeperA, id, "release");
    expect(again.status).toBe(409);
    expect(((await again.json()) as { error: { message: string } }).error.message).toMatch(/Nobody has claimed/);
    expect((await post(people.keeperA, id, "settle", { note: "Turned the fresh food under; bed cooling." })).status).toBe(200);
    expect((await stateOf(id)).state).toBe("settled");
    const events = await eventsOf(id);
    expect(events.map((e) => e.type)).toEqual(["claimed", "released", "settled"]);
    expect(events[2]!.detail.note).toBe("Turned the fresh food under; bed cooling.");
  });

  it("a settle note with a control character is refused naming the note, and the alert stays open", async () => {
    const id = await openAlert(farms.a);
    const res = await post(people.keeperA, id, "settle", { note: "bad\u0007note" });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { error: { field?: string } }).error.field).toBe("note");
    expect((await stateOf(id)).state).toBe("raised");
  });

  it("a keeper of farm A cannot see or change farm B's alert: 404 on the API and on the page", async () => {
    const id = await openAlert(farms.b);
    expect((await people.keeperA.fetch(`/api/alerts/${id}`)).status).toBe(404);
    for (const action of ["claim", "release", "settle"] as const) expect((await post(people.keeperA, id, action)).status, action).toBe(404);
    expect(await stateOf(id)).toMatchObject({ state: "raised", claimed_by: null });
    // Under farm B's URL (where A's keeper is no member) the layout refuses: 404. Under farm A's own
    // URL the refusal comes from the page below its loading boundary, after the 200 has streamed,
    // so Next.js marks the answer noindex and shows the not-found page (Next.js docs, "loading.js").
    const underB = await people.keeperA.fetch(`/farms/${farms.b.farm}/alerts/${id}`);
    expect(underB.status).toBe(404);
    expect(await underB.text()).not.toContain("31.0 °C");
    for (const path of [`/farms/${farms.a.farm}/alerts/${id}`, `/farms/${farms.a.farm}/alerts/not-an-id`]) {
      const page = await people.keeperA.fetch(path);
      expect(page.status, path).toBeLessThan(500);
      const body = await page.text();
      expect(body, path).toMatch(/<meta name="robots" content="noindex"/);
      expect(body, path).not.toContain("31.0 °C");
    }
    // Farm B's own keeper sees it.
    const own = await people.keeperB.fetch(`/farms/${farms.b.farm}/alerts/${id}`);
    expect(own.status).toBe(200);
    expect(await own.text()).toContain("31.0 °C");
  });

  it("the history lists only the farm's own alerts and filters by state", async () => {
    const mine = await openAlert(farms.a);
    const theirs = await openAlert(farms.b);
    const all = await (await people.keeperA.fetch(`/api/farms/${farms.a.farm}/alerts?state=all`)).json();
    const ids = (all as { alerts: { alert: { id: string } }[] }).alerts.map((a) => a.alert.id);
    expect(ids).toContain(mine);
    expect(ids).not.toContain(theirs);
    const settled = (await (await people.keeperA.fetch(`/api/farms/${farms.a.farm}/alerts?state=settled`)).json()) as {
      alerts: { alert: { state: string } }[];
    };
    expect(settled.alerts.length).toBeGreaterThan(0);
    expect(settled.alerts.every((a) => a.alert.state === "settled")).toBe(true);
    const bad = await people.keeperA.fetch(`/api/farms/${farms.a.farm}/alerts?kind=flood`);
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { error: { field?: string } }).error.field).toBe("kind");
    // A viewer reads an alert's page, told plainly that claiming and settling are for the crew.
    const viewerPage = await people.viewerA.fetch(`/farms/${farms.a.farm}/alerts/${mine}`);
    expect(viewerPage.status).toBe(200);
    const text = await viewerPage.text();
    expect(text).toContain("Claiming and settling it are for the farm");
    expect(text).not.toContain("Settle this alert");
    const keeperPage = await (await people.keeperA.fetch(`/farms/${farms.a.farm}/alerts/${mine}`)).text();
    expect(keeperPage).toContain("Settle this alert");
    // A viewer reads the history page; a farm's page for a non-member is not found.
    expect((await people.viewerA.fetch(`/farms/${farms.a.farm}/alerts?state=open`)).status).toBe(200);
    expect((await people.keeperB.fetch(`/farms/${farms.a.farm}/alerts`)).status).toBe(404);
  });

  it("the history shows 30 at a time, newest first, and 'Older alerts' leads to the rest with the filters kept", async () => {
    const f = await farmWithZone("Zz Crew Test Farm Paged");
    await db.query(`insert into memberships (user_id, farm_id, role) select user_id, $1, 'viewer' from memberships where farm_id = $2 and role = 'viewer'`, [
      f.farm,
      farms.a.farm,
    ]);
    // 32 settled drying alerts an hour apart, numbered from the newest, and one heat alert.
    for (let i = 1; i <= 32; i++) {
      await db.query(
        `insert into alerts (farm_id, bin_id, zone_id, kind, level, state, subject, message, raised_at, settled_at) values ($1, $2, $3, 'drying', 'heads_up', 'settled', $4, $5, now() - $6 * interval '1 hour', now())`,
        [f.farm, f.bin, f.zone, `zone:${f.zone}:drying:${i}`, `Drying number ${i}.`, i],
      );
    }
    await openAlert(f);
    // Each card is in the HTML twice (the markup and the payload React hydrates from): once each, in order.
    const numbers = (html: string) => [...new Set([...html.matchAll(/Drying number (\d+)\./g)].map((m) => Number(m[1])))];
    const first = await (await people.viewerA.fetch(`/farms/${f.farm}/alerts?kind=drying`)).text();
    expect(numbers(first)).toEqual(Array.from({ length: 30 }, (_, i) => i + 1));
    expect(first).not.toContain("31.0 °C");
    const older = /href="([^"]*before=[^"]*)"[^>]*>Older alerts/.exec(first)?.[1]?.replaceAll("&amp;", "&");
    expect(older).toContain("kind=drying");
    const second = await (await people.viewerA.fetch(older!)).text();
    expect(numbers(second)).toEqual([31, 32]);
    expect(second).not.toContain(">Older alerts<");
    await db.query(`delete from farms where id = $1`, [f.farm]);
  });
});
