// Owners manage the team: roles change, people leave, the last owner stays; everyone reads the
// list, only owners see e-mails and open invitations; another farm's ids get 404.
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, type Session } from "../../helpers/app";
import { pageText, submitForm } from "../../helpers/form";
import { addToFarm, appDb, makeFarm, makePerson, uniq, waitForMail, type Person } from "./fixtures";

type Role = "owner" | "keeper" | "viewer";
let c: pg.Client;

async function team(roles: Role[]) {
  const farmId = await makeFarm(c);
  const people: { person: Person; session: Session; role: Role }[] = [];
  for (const [i, role] of roles.entries()) {
    const person = await makePerson(c, `${role} ${i + 1}`);
    await addToFarm(c, farmId, person.id, role);
    people.push({ person, role, session: await signIn(person.email, person.password) });
  }
  return { farmId, people };
}
const owners = async (farmId: string) =>
  (await c.query(`select count(*)::int as n from memberships where farm_id = $1 and role = 'owner'`, [farmId])).rows[0].n as number;
const roleOf = async (farmId: string, userId: string) =>
  ((await c.query(`select role from memberships where farm_id = $1 and user_id = $2`, [farmId, userId])).rows[0]?.role ?? null) as Role | null;
const errorOf = async (res: Response) => ((await res.json()) as { error: { code: string; message: string } }).error;

beforeAll(async () => {
  c = await appDb();
});
afterAll(async () => {
  await c?.end();
});

describe("the team list", () => {
  it("every member sees names and roles; only owners also see e-mails and open invitations", async () => {
    const { farmId, people } = await team(["owner", "keeper", "viewer"]);
    const [o, k, v] = people as [(typeof people)[0], (typeof people)[0], (typeof people)[0]];
    const invited = `pending-${uniq()}@example.org`;
    expect((await o.session.fetch(`/api/farms/${farmId}/invitations`, { method: "POST", json: { email: invited, role: "viewer" } })).status).toBe(201);

    const asOwner = (await (await o.session.fetch(`/api/farms/${farmId}/members`)).json()) as {
      members: Record<string, unknown>[];
      invitations: { email: string }[];
    };
    expect(asOwner.members.map((m) => [m.name, m.role, m.email])).toEqual([
      [o.person.name, "owner", o.person.email],
      [k.person.name, "keeper", k.person.email],
      [v.person.name, "viewer", v.person.email],
    ]);
    expect(asOwner.invitations.map((i) => i.email)).toEqual([invited]);

    for (const m of [k, v]) {
      const res = await m.session.fetch(`/api/farms/${farmId}/members`);
      expect(res.status).toBe(200);
      const body = (await res.json()) as { members: Record<string, unknown>[] };
      expect(body.members.map((x) => [x.name, x.role])).toEqual(asOwner.members.map((x) => [x.name, x.role]));
      for (const x of body.members) expect(x).not.toHaveProperty("email");
      expect(body).not.toHaveProperty("invitations");
    }
  });
});

describe("changing roles and removing people", () => {
  it("an owner makes a keeper a viewer, and the keeper's role follows", async () => {
    const { farmId, people } = await team(["owner", "keeper"]);
    const [o, k] = people as [(typeof people)[0], (typeof people)[0]];
    const res = await o.session.fetch(`/api/farms/${farmId}/members/${k.person.id}`, { method: "PATCH", json: { role: "viewer" } });
    expect(res.status).toBe(200);
    expect(((await (await k.session.fetch(`/api/farms/${farmId}`)).json()) as { role: string }).role).toBe("viewer");
  });

  it("the last owner cannot be demoted or removed (409), even by themselves", async () => {
    const { farmId, people } = await team(["owner", "keeper"]);
    const o = people[0]!;
    const demote = await o.session.fetch(`/api/farms/${farmId}/members/${o.person.id}`, { method: "PATCH", json: { role: "keeper" } });
    expect(demote.status).toBe(409);
    expect((await errorOf(demote)).message).toBe("This is the farm's last owner and must stay an owner. Make someone else an owner first.");
    const remove = await o.session.fetch(`/api/farms/${farmId}/members/${o.person.id}`, { method: "DELETE" });
    expect(remove.status).toBe(409);
    expect((await errorOf(remove)).message).toBe("This is the farm's last owner and cannot be removed. Make someone else an owner first.");
    expect(await roleOf(farmId, o.person.id)).toBe("owner");
  });

  it("with a second owner the first may step down, and then the second is the last", async () => {
    const { farmId, people } = await team(["owner", "keeper"]);
    const [o, k] = people as [(typeof people)[0], (typeof people)[0]];
    expect((await o.session.fetch(`/api/farms/${farmId}/members/${k.person.id}`, { method: "PATCH", json: { role: "owner" } })).status).toBe(200);
    expect((await o.session.fetch(`/api/farms/${farmId}/members/${o.person.id}`, { method: "DELETE" })).status).toBe(204);
    expect(await roleOf(farmId, o.person.id)).toBeNull();
    expect((await o.session.fetch(`/api/farms/${farmId}`)).status).toBe(404);
    expect((await k.session.fetch(`/api/farms/${farmId}/members/${k.person.id}`, { method: "DELETE" })).status).toBe(409);
  });

  it("two owners demoting each other at once leave exactly one owner", async () => {
    const { farmId, people } = await team(["owner", "owner"]);
    const [a, b] = people as [(typeof people)[0], (typeof people)[0]];
    const [ra, rb] = await Promise.all([
      a.session.fetch(`/api/farms/${farmId}/members/${b.person.id}`, { method: "PATCH", json: { role: "keeper" } }),
      b.session.fetch(`/api/farms/${farmId}/members/${a.person.id}`, { method: "PATCH", json: { role: "keeper" } }),
    ]);
    // The loser is refused either way: 409 when both were still owners as they were authorized, 403
    // when the winner's change had committed first and the loser is a keeper by then.
    const [won, lost] = [ra.status, rb.status].sort();
    expect(won).toBe(200);
    expect([403, 409]).toContain(lost);
    expect(await owners(farmId)).toBe(1);
  });

  it("a removed member loses access to the farm", async () => {
    const { farmId, people } = await team(["owner", "keeper"]);
    const [o, k] = people as [(typeof people)[0], (typeof people)[0]];
    expect((await k.session.fetch(`/api/farms/${farmId}/today`)).status).toBe(200);
    expect((await o.session.fetch(`/api/farms/${farmId}/members/${k.person.id}`, { method: "DELETE" })).status).toBe(204);
    expect((await k.session.fetch(`/api/farms/${farmId}/today`)).status).toBe(404);
  });

  it("keepers and viewers cannot change roles or remove anyone (403)", async () => {
    const { farmId, people } = await team(["owner", "keeper", "viewer"]);
    const [o, k, v] = people as [(typeof people)[0], (typeof people)[0], (typeof people)[0]];
    for (const m of [k, v]) {
      expect((await m.session.fetch(`/api/farms/${farmId}/members/${o.person.id}`, { method: "PATCH", json: { role: "viewer" } })).status).toBe(403);
      expect((await m.session.fetch(`/api/farms/${farmId}/members/${o.person.id}`, { method: "DELETE" })).status).toBe(403);
    }
    expect(await roleOf(farmId, o.person.id)).toBe("owner");
  });

  it("another farm's member ids get 404, and nothing changes there", async () => {
    const mine = await team(["owner"]);
    const theirs = await team(["owner", "keeper"]);
    const me = mine.people[0]!;
    const theirKeeper = theirs.people[1]!.person.id;
    expect((await me.session.fetch(`/api/farms/${mine.farmId}/members/${theirKeeper}`, { method: "PATCH", json: { role: "viewer" } })).status).toBe(404);
    expect((await me.session.fetch(`/api/farms/${mine.farmId}/members/${theirKeeper}`, { method: "DELETE" })).status).toBe(404);
    expect((await me.session.fetch(`/api/farms/${theirs.farmId}/members/${theirKeeper}`, { method: "DELETE" })).status).toBe(404);
    expect((await me.session.fetch(`/api/farms/${theirs.farmId}/members`)).status).toBe(404);
    expect((await me.session.fetch(`/api/farms/${mine.farmId}/members/not-a-uuid`, { method: "DELETE" })).status).toBe(404);
    expect(await roleOf(theirs.farmId, theirKeeper)).toBe("keeper");
  });
});

describe("the team page", () => {
  it("owners get the invite form and controls; keepers and viewers read the list only", async () => {
    const { farmId, people } = await team(["owner", "keeper", "viewer"]);
    const [o, k, v] = people as [(typeof people)[0], (typeof people)[0], (typeof people)[0]];
    const ownerHtml = await (await o.session.fetch(`/farms/${farmId}/team`)).text();
    expect(pageText(ownerHtml)).toContain("Send invitation");
    expect(ownerHtml).toContain(k.person.email);
    expect(pageText(ownerHtml)).toContain("The farm's only owner.");
    for (const m of [k, v]) {
      const html = await (await m.session.fetch(`/farms/${farmId}/team`)).text();
      const words = pageText(html);
      expect(words).toContain(o.person.name);
      expect(words).toContain("Keeper");
      expect(words).toContain("Only an owner of");
      expect(words).not.toContain("Send invitation");
      expect(html).not.toContain(o.person.email);
      expect(html).not.toContain('name="role"');
    }
    // Today links here.
    expect(await (await k.session.fetch(`/farms/${farmId}`)).text()).toContain(`href="/farms/${farmId}/team"`);
  });

  it("the invite form names a bad e-mail, sends a good one, and revoking works, all without script", async () => {
    const { farmId, people } = await team(["owner", "keeper"]);
    const [o, k] = people as [(typeof people)[0], (typeof people)[0]];
    const path = `/farms/${farmId}/team`;
    const bad = await submitForm(o.session, path, { email: "worms at home" });
    expect(bad.text).toContain("Give an e-mail address like name@example.org.");
    const email = `by-form-${uniq()}@example.org`;
    const good = await submitForm(o.session, path, { email, role: "viewer" });
    expect(good.text).toContain(`Invitation sent to ${email} as viewer.`);
    expect((await waitForMail(email))[0]!.text).toContain("as a viewer");
    const listed = await (await o.session.fetch(path)).text();
    expect(pageText(listed)).toContain(`Waiting to join (1)`);
    const revoked = await submitForm(o.session, path, {}, (f) => f.includes('name="invitationId"'));
    expect(revoked.text).toContain("Invitation revoked; its link no longer works.");
    expect(pageText(revoked.html)).toContain("Waiting to join (0)");

    const changed = await submitForm(o.session, path, { role: "viewer" }, (f) => f.includes(`value="${k.person.id}"`) && f.includes('name="role"'));
    expect(changed.text).toContain("Now viewer.");
    expect(await roleOf(farmId, k.person.id)).toBe("viewer");
  });
});
