// Pages authorize through one helper (requirePageMember), read once per request by the farm layout
// and the page beneath it: another farm's pages and things answer 404 whichever way they are named,
// and a viewer's pages carry no owner controls. Through the built app, signed in as a browser is.
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { anonymous, signIn, type Session } from "../../helpers/app";
import { addMember, makeFarm, type TestFarm } from "../series/fixtures";

const PASSWORD = "page-access-pass";
let c: pg.Client;
let mine: TestFarm;
let theirs: TestFarm;
let owner: Session;
let viewer: Session;
let keeper: Session;
let keeperId: string;
const emails: string[] = [];

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  [mine, theirs] = [await makeFarm(c, { zones: ["fresh", "working"] }), await makeFarm(c, { zones: ["working"] })];
  emails.push(await addMember(c, mine.farmId, "owner", PASSWORD), await addMember(c, mine.farmId, "viewer", PASSWORD));
  // The other farm has an owner of its own; ours is not a member there.
  emails.push(await addMember(c, theirs.farmId, "owner", PASSWORD));
  emails.push(await addMember(c, mine.farmId, "keeper", PASSWORD));
  [owner, viewer, keeper] = await Promise.all([signIn(emails[0]!, PASSWORD), signIn(emails[1]!, PASSWORD), signIn(emails[3]!, PASSWORD)]);
  keeperId = (await c.query(`select id from users where email = $1`, [emails[3]])).rows[0].id;
});

afterAll(async () => {
  if (c) {
    await c.query(`delete from farms where id = any($1::uuid[])`, [[mine?.farmId, theirs?.farmId].filter(Boolean)]);
    await c.query(`delete from users where email = any($1::text[])`, [emails]);
    await c.end();
  }
});

const pagesOf = (f: TestFarm, under = f.farmId) => [
  `/farms/${under}`,
  `/farms/${under}/probes`,
  `/farms/${under}/team`,
  `/farms/${under}/settings`,
  `/farms/${under}/imports`,
  `/farms/${under}/logbook`,
  `/farms/${under}/bins/${f.binId}`,
  `/farms/${under}/bins/${f.binId}/rules`,
  `/farms/${under}/zones/${f.zones.working}`,
  `/farms/${under}/probes/${f.probes[0]!.id}`,
];

// A refusal in the layout is a 404. One in a page below a loading boundary comes after the 200 has
// been streamed, so Next.js marks that answer noindex and the browser shows the not-found page
// (Next.js docs, "loading.js": status codes when streaming). Either way the page says noindex.
const NOT_HERE = /<meta name="robots" content="noindex"/;
async function refusal(s: Session, path: string) {
  const r = await s.fetch(path);
  const body = await r.text();
  return { path, status: r.status, notHere: NOT_HERE.test(body), body };
}

// The app under test writes its wormward:page-access lines here (tests/setup/global.ts).
const webLog = path.join(import.meta.dirname, "..", "..", "..", ".data", `${process.env.WORMWARD_TEST_CLUSTER ?? "pg-test"}-web.log`);
function lookupsOf(userId: string) {
  const lines = fs
    .readFileSync(webLog, "utf8")
    .split("\n")
    .filter((l) => l.includes("wormward:page-access") && l.includes(userId));
  return { sessions: lines.filter((l) => l.includes("session read")).length, roles: lines.filter((l) => l.includes("role read")).length };
}

describe("pages authorize once, through one helper", () => {
  it("a page reads the session and the role once, though the shell, the farm layout and the page each ask", async () => {
    for (const page of [`/farms/${mine.farmId}/bins/${mine.binId}`, `/farms/${mine.farmId}/zones/${mine.zones.fresh}`, `/farms/${mine.farmId}/team`]) {
      const before = lookupsOf(keeperId);
      const r = await keeper.fetch(page);
      expect(r.status).toBe(200);
      await r.text(); // the page below the loading boundary streams after the layout
      const after = lookupsOf(keeperId);
      expect([page, after.sessions - before.sessions, after.roles - before.roles]).toEqual([page, 1, 1]);
    }
  });

  it("every page of our own farm opens for its owner", async () => {
    for (const path of pagesOf(mine)) {
      const r = await refusal(owner, path);
      expect([path, r.status, r.notHere]).toEqual([path, 200, false]);
    }
  });

  it("every page of another farm is a 404 for someone who is not a member there", async () => {
    for (const path of pagesOf(theirs)) {
      const r = await refusal(owner, path);
      expect([path, r.status, r.notHere]).toEqual([path, 404, true]);
    }
  });

  it("another farm's bin, zone or probe named under our own farm's address is a 404", async () => {
    const smuggled = pagesOf(theirs, mine.farmId).filter((p) => /\/(bins|zones|probes)\/[^/]+/.test(p));
    expect(smuggled).toHaveLength(4);
    const { rows } = await c.query(`select name from bins where id = $1`, [theirs.binId]);
    const theirBin = rows[0].name as string;
    for (const path of smuggled) {
      const r = await refusal(owner, path);
      expect([path, r.notHere, r.body.includes(theirBin), r.body.includes(theirs.probes[0]!.code)]).toEqual([path, true, false, false]);
    }
  });

  it("the browser tab names the bin, and the zone with its bin; another farm's names never reach a title", async () => {
    const { rows } = await c.query(`select id, name from bins where id = any($1::uuid[])`, [[mine.binId, theirs.binId]]);
    const nameOf = (id: string) => rows.find((r) => r.id === id).name as string;
    const title = async (path: string) => /<title>([^<]*)<\/title>/.exec(await (await owner.fetch(path)).text())?.[1] ?? "";
    expect(await title(`/farms/${mine.farmId}/bins/${mine.binId}`)).toContain(nameOf(mine.binId));
    expect(await title(`/farms/${mine.farmId}/zones/${mine.zones.working}`)).toContain(`Working zone · ${nameOf(mine.binId)}`);
    expect(await title(`/farms/${mine.farmId}/bins/${theirs.binId}`)).not.toContain(nameOf(theirs.binId));
    expect(await title(`/farms/${mine.farmId}/zones/${theirs.zones.working}`)).not.toContain(nameOf(theirs.binId));
  });

  it("ids that are not ids are a 404, not an error", async () => {
    for (const path of [`/farms/not-a-farm`, `/farms/${mine.farmId}/bins/not-a-bin`, `/farms/${mine.farmId}/zones/1`, `/farms/${mine.farmId}/probes/abc`]) {
      const r = await refusal(owner, path);
      expect([path, r.status < 500, r.notHere]).toEqual([path, true, true]);
    }
  });

  it("a viewer reads the farm's pages but sees no owner controls", async () => {
    const today = await (await viewer.fetch(`/farms/${mine.farmId}`)).text();
    expect(today).toContain(`href="/farms/${mine.farmId}/team"`);
    expect(today).not.toContain(`href="/farms/${mine.farmId}/settings"`);
    expect(today).not.toContain(`href="/farms/${mine.farmId}/imports"`);
    const settings = await viewer.fetch(`/farms/${mine.farmId}/settings`);
    expect(settings.status).toBe(200);
    expect(await settings.text()).toContain("Only an owner of");
    // The owner, for contrast, has both links on the same page.
    const ownersToday = await (await owner.fetch(`/farms/${mine.farmId}`)).text();
    expect(ownersToday).toContain(`href="/farms/${mine.farmId}/settings"`);
    expect(ownersToday).toContain(`href="/farms/${mine.farmId}/imports"`);
  });

  it("signed out, a farm page sends the person to sign in", async () => {
    const r = await anonymous().fetch(`/farms/${mine.farmId}/bins/${mine.binId}`);
    expect(r.status).toBeGreaterThanOrEqual(300);
    expect(r.status).toBeLessThan(400);
    expect(r.headers.get("location")).toMatch(/\/sign-in/);
  });
});
