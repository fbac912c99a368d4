// Every server action checks the session and the role on the server, as the API does: each one is
// called over HTTP the way React posts a form (Next-Action header, the encoded arguments), as a
// viewer, a keeper, an owner, an owner naming another farm's ids, and signed out; the database
// shows whether anything changed. An action added without a row here fails the last test.
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { anonymous, appUrl, signIn, type Session } from "../../helpers/app";
import { hashPassword } from "@/lib/server/auth/password";

type Role = "owner" | "keeper" | "viewer";
type Caller = Role | "other-farm" | "signed-out";
type Ids = { farm: string; bin: string; member: string; invitation: string };

const root = path.resolve(import.meta.dirname, "../../..");

type ManifestEntry = { workers: Record<string, unknown>; filename: string; exportedName: string };
function actionIds(): Map<string, { id: string; page: string }> {
  const file = path.join(root, ".next/server/server-reference-manifest.json");
  const manifest = JSON.parse(fs.readFileSync(file, "utf8")) as { node: Record<string, ManifestEntry> };
  const out = new Map<string, { id: string; page: string }>();
  for (const [id, e] of Object.entries(manifest.node)) out.set(`${e.filename}#${e.exportedName}`, { id, page: Object.keys(e.workers)[0]! });
  return out;
}

// React's form action encoding (react-server-dom's encodeReply): the FormData's fields go under a
// "_<part>_" prefix and part "0" holds the argument list, here (previous state, that FormData).
async function callAction(s: Session, key: string, pagePath: string, fields: Record<string, string>) {
  const action = actionIds().get(key);
  if (!action) throw new Error(`${key} is not in the build's server-reference manifest`);
  const body = new FormData();
  for (const [k, v] of Object.entries(fields)) body.append(`_1_${k}`, v);
  body.append("0", JSON.stringify([{}, "$K1"]));
  const res = await s.fetch(pagePath, {
    method: "POST",
    body,
    headers: { "next-action": action.id, accept: "text/x-component", origin: appUrl() },
  });
  return { status: res.status, text: await res.text() };
}

// The action's answer inside the RSC payload: {"ok": …} or {"error": …}.
const said = (text: string) => ({ ok: /"ok":"/.test(text), error: /"error":"/.test(text) });

type Row = {
  action: string; // "<file under app>#<export>"
  page: (ids: Ids) => string;
  fields: (ids: Ids) => Record<string, string>;
  allowed: Role[];
  // How the database says the action took effect on these ids.
  changed: (ids: Ids) => Promise<boolean>;
};

const OWNER: Role[] = ["owner"];
const CREW: Role[] = ["owner", "keeper"];
const settings = "app/(farm)/farms/[farmId]/settings/actions.ts";
const team = "app/(farm)/farms/[farmId]/team/actions.ts";
const binPage = "app/(farm)/farms/[farmId]/bins/[binId]/actions.ts";

let db: pg.Client;
const q = async (sql: string, params: unknown[]) => (await db.query(sql, params)).rows;

const rows: Row[] = [
  {
    action: `${settings}#saveFarm`,
    page: (i) => `/farms/${i.farm}/settings`,
    fields: (i) => ({ farmId: i.farm, name: "Renamed by an action", unitSystem: "imperial", timezone: "Europe/Dublin" }),
    allowed: OWNER,
    changed: async (i) => (await q(`select name from farms where id = $1`, [i.farm]))[0].name === "Renamed by an action",
  },
  {
    action: `${settings}#archiveBinAction`,
    page: (i) => `/farms/${i.farm}/settings`,
    fields: (i) => ({ farmId: i.farm, binId: i.bin }),
    allowed: OWNER,
    changed: async (i) => (await q(`select archived_at from bins where id = $1`, [i.bin]))[0].archived_at !== null,
  },
  {
    action: `${settings}#bringBackBin`,
    page: (i) => `/farms/${i.farm}/settings`,
    fields: (i) => ({ farmId: i.farm, binId: i.bin }),
    allowed: OWNER,
    // The scratch bin starts archived for this row (see archived below).
    changed: async (i) => (await q(`select archived_at from bins where id = $1`, [i.bin]))[0].archived_at === null,
  },
  {
    action: `${binPage}#saveBinCycle`,
    page: (i) => `/farms/${i.farm}/bins/${i.bin}`,
    fields: (i) => ({ binId: i.bin, feedingIntervalDays: "9", plannedHarvestOn: "2027-01-15" }),
    allowed: CREW,
    changed: async (i) => {
      const [b] = await q(`select feeding_interval_days, planned_harvest_on::text as planned from bins where id = $1`, [i.bin]);
      return b.feeding_interval_days === 9 && b.planned === "2027-01-15";
    },
  },
  {
    action: `${team}#invite`,
    page: (i) => `/farms/${i.farm}/team`,
    fields: (i) => ({ farmId: i.farm, email: `invited-${i.bin.slice(0, 8)}@example.org`, role: "keeper" }),
    allowed: OWNER,
    changed: async (i) =>
      (await q(`select 1 from invitations where farm_id = $1 and email = $2`, [i.farm, `invited-${i.bin.slice(0, 8)}@example.org`])).length > 0,
  },
  {
    action: `${team}#revoke`,
    page: (i) => `/farms/${i.farm}/team`,
    fields: (i) => ({ farmId: i.farm, invitationId: i.invitation }),
    allowed: OWNER,
    changed: async (i) => (await q(`select 1 from invitations where id = $1`, [i.invitation])).length === 0,
  },
  {
    action: `${team}#changeRole`,
    page: (i) => `/farms/${i.farm}/team`,
    fields: (i) => ({ farmId: i.farm, userId: i.member, role: "viewer" }),
    allowed: OWNER,
    changed: async (i) => (await q(`select role from memberships where farm_id = $1 and user_id = $2`, [i.farm, i.member]))[0]?.role === "viewer",
  },
  {
    action: `${team}#remove`,
    page: (i) => `/farms/${i.farm}/team`,
    fields: (i) => ({ farmId: i.farm, userId: i.member }),
    allowed: OWNER,
    changed: async (i) => (await q(`select 1 from memberships where farm_id = $1 and user_id = $2`, [i.farm, i.member])).length === 0,
  },
];

// Actions of the signed-out shell or of the caller's own record, with where their checks are
// proven: a token is the credential there, not a farm role.
const ELSEWHERE: Record<string, string> = {
  "app/(auth)/forgot/actions.ts#askForReset": "tests/integration/auth/password-reset.test.ts (one answer for any address)",
  "app/(auth)/reset/[token]/actions.ts#setNewPassword": "tests/integration/auth/password-reset.test.ts (the link is the credential)",
  "app/(auth)/join/[token]/actions.ts#joinNew": "tests/integration/team/invitations.test.ts (the link is the credential)",
  "app/(auth)/join/[token]/actions.ts#joinMe": "tests/integration/team/invitations.test.ts (signed in plus the link)",
  "app/(farm)/me/actions.ts#saveQuietHours": "below (a person's own record)",
  "app/(auth)/sign-up/actions.ts#signUpAction": "tests/integration/auth/sign-up.test.ts (one answer for any address)",
  "app/(auth)/check-mail/actions.ts#resendLink": "tests/integration/auth/sign-up.test.ts (the signed-in person's own link)",
  "app/(auth)/verify/[token]/actions.ts#confirmAddress": "tests/integration/auth/sign-up.test.ts (the link is the credential)",
  "app/(farm)/farms/new/actions.ts#startFarmAction": "tests/integration/farms/farm-life.test.ts (any confirmed person; they own what they start)",
  "app/(farm)/me/farms/actions.ts#leaveFarmAction": "tests/integration/farms/farm-life.test.ts (a person's own membership)",
  "app/(farm)/me/farms/actions.ts#deleteFarmAction": "tests/integration/farms/farm-life.test.ts (owners only, by role)",
  "app/(farm)/me/data/actions.ts#deleteAccountAction": "tests/integration/farms/farm-life.test.ts (a person's own record)",
};

const sessions = {} as Record<Role | "other-owner" | "gone", Session>;
let farm: string;
let otherIds: Ids;

async function scratchIds(farmId: string, opts: { archived?: boolean } = {}): Promise<Ids> {
  const tag = Math.random().toString(36).slice(2, 10);
  const bin = (
    await q(`insert into bins (farm_id, name, style, species, archived_at) values ($1, $2, 'tote', 'eisenia-fetida', $3) returning id`, [
      farmId,
      `Action bin ${tag}`,
      opts.archived ? new Date() : null,
    ])
  )[0].id;
  const member = (await q(`insert into users (email, name, password_hash) values ($1, 'Scratch Keeper', 'x') returning id`, [`member-${tag}@example.org`]))[0]
    .id;
  await q(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'keeper')`, [member, farmId]);
  const invitation = (
    await q(`insert into invitations (farm_id, email, role, token_hash, expires_at) values ($1, $2, 'viewer', $3, now() + interval '1 day') returning id`, [
      farmId,
      `open-${tag}@example.org`,
      `scratch-${tag}`,
    ])
  )[0].id;
  await q(`update farms set name = $2 where id = $1`, [farmId, `Action farm ${tag}`]);
  return { farm: farmId, bin, member, invitation };
}

beforeAll(async () => {
  db = new pg.Client({ connectionString: inject("appDbUrl") });
  await db.connect();
  const hash = await hashPassword("action-test-pass");
  const person = async (label: string) =>
    (
      await q(`insert into users (email, name, password_hash) values ($1, $2, $3) returning id, email`, [
        `${label}-${Date.now()}-${Math.random().toString(36).slice(2, 6)}@example.org`,
        label,
        hash,
      ])
    )[0] as { id: string; email: string };
  const [owner, keeper, viewer, otherOwner] = [await person("owner"), await person("keeper"), await person("viewer"), await person("other-owner")];
  farm = (await q(`insert into farms (name) values ('Zz Action Test Farm') returning id`, []))[0].id;
  await q(`insert into memberships (user_id, farm_id, role) values ($1, $4, 'owner'), ($2, $4, 'keeper'), ($3, $4, 'viewer')`, [
    owner.id,
    keeper.id,
    viewer.id,
    farm,
  ]);
  const otherFarm = (await q(`insert into farms (name) values ('Zz Other Action Farm') returning id`, []))[0].id;
  await q(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'owner')`, [otherOwner.id, otherFarm]);
  otherIds = { ...(await scratchIds(otherFarm)) };
  sessions.owner = await signIn(owner.email, "action-test-pass");
  sessions.keeper = await signIn(keeper.email, "action-test-pass");
  sessions.viewer = await signIn(viewer.email, "action-test-pass");
  sessions["other-owner"] = await signIn(otherOwner.email, "action-test-pass");
  // A well-signed token whose person no longer exists: the proxy lets it through to the page, so
  // the action itself must see nobody signed in.
  const gone = await person("gone");
  sessions.gone = await signIn(gone.email, "action-test-pass");
  await q(`delete from users where id = $1`, [gone.id]);
});

afterAll(async () => {
  await db?.end();
});

describe("every server action checks the session and the role", () => {
  for (const row of rows) {
    const name = row.action.split("#")[1];
    describe(name!, () => {
      const callers: Caller[] = ["signed-out", "viewer", "keeper", "owner", "other-farm"];
      for (const caller of callers) {
        const allowed = caller !== "signed-out" && caller !== "other-farm" && row.allowed.includes(caller);
        const title =
          caller === "signed-out"
            ? "signed out changes nothing"
            : caller === "other-farm"
              ? "an owner naming another farm's ids changes nothing there"
              : `${caller} ${allowed ? "takes effect" : "is refused and changes nothing"}`;
        it(title, async () => {
          const ids = caller === "other-farm" ? { ...otherIds } : await scratchIds(farm, { archived: name === "bringBackBin" });
          if (caller === "other-farm" && name === "bringBackBin") await q(`update bins set archived_at = now() where id = $1`, [ids.bin]);
          if (caller === "other-farm" && name === "revoke") ids.invitation = (await scratchIds(ids.farm)).invitation;
          if (caller === "other-farm" && (name === "changeRole" || name === "remove")) ids.member = (await scratchIds(ids.farm)).member;
          // The other farm's ids are posted to the caller's own farm page and to theirs alike.
          const s = caller === "signed-out" ? anonymous() : caller === "other-farm" ? sessions.owner : sessions[caller];
          const res = await callAction(s, row.action, row.page(caller === "other-farm" ? { ...ids, farm } : ids), row.fields(ids));
          if (caller === "signed-out") {
            // Past the page's sign-in redirect too: the action's own check answers.
            const past = await callAction(sessions.gone, row.action, row.page(ids), row.fields(ids));
            expect(past.text, past.text.slice(0, 400)).toMatch(/"error":"Sign in first\."/);
          }
          if (allowed) {
            expect(said(res.text), res.text.slice(0, 400)).toMatchObject({ ok: true });
            expect(await row.changed(ids)).toBe(true);
          } else {
            // Signed out, the page's sign-in redirect answers; signed in, the action's own refusal.
            if (caller === "signed-out") expect(res.status).toBe(307);
            else expect(said(res.text), res.text.slice(0, 400)).toMatchObject({ ok: false, error: true });
            expect(await row.changed(ids)).toBe(false);
          }
        });
      }
    });
  }

  describe("saveQuietHours (a person's own record)", () => {
    const fields = { quietFrom: "21:30", quietTo: "06:15", timezone: "Europe/Lisbon" };
    it("signed out changes nothing", async () => {
      const before = await q(`select count(*)::int as n from users where quiet_from = '21:30' and timezone = 'Europe/Lisbon'`, []);
      const res = await callAction(anonymous(), "app/(farm)/me/actions.ts#saveQuietHours", "/me", fields);
      expect(said(res.text).ok).toBe(false);
      expect(await q(`select count(*)::int as n from users where quiet_from = '21:30' and timezone = 'Europe/Lisbon'`, [])).toEqual(before);
    });
    for (const role of ["viewer", "keeper", "owner"] as Role[]) {
      it(`${role} changes their own quiet hours and no one else's`, async () => {
        const res = await callAction(sessions[role], "app/(farm)/me/actions.ts#saveQuietHours", "/me", {
          ...fields,
          quietFrom: `2${["viewer", "keeper", "owner"].indexOf(role)}:30`,
        });
        expect(said(res.text), res.text.slice(0, 400)).toMatchObject({ ok: true });
        const changed = await q(`select name from users where quiet_from = $1 and timezone = 'Europe/Lisbon'`, [
          `2${["viewer", "keeper", "owner"].indexOf(role)}:30`,
        ]);
        expect(changed.map((r) => r.name)).toEqual([role]);
      });
    }
  });

  it("the table covers every server action in app/", () => {
    const found: string[] = [];
    const walk = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (/\.tsx?$/.test(e.name)) {
          const src = fs.readFileSync(p, "utf8");
          if (!/^\s*["']use server["']/m.test(src)) continue;
          const rel = path.relative(root, p);
          for (const m of src.matchAll(/export\s+(?:const|let|(?:async\s+)?function)\s+([A-Za-z0-9_$]+)/g)) found.push(`${rel}#${m[1]}`);
        }
      }
    };
    walk(path.join(root, "app"));
    walk(path.join(root, "components"));
    const covered = new Set([...rows.map((r) => r.action), ...Object.keys(ELSEWHERE)]);
    expect(found.length).toBeGreaterThan(0);
    expect(found.filter((f) => !covered.has(f))).toEqual([]);
    // And each is what the build serves, so the calls above reached the real thing.
    const built = actionIds();
    expect(found.filter((f) => !built.has(f))).toEqual([]);
  });
});
