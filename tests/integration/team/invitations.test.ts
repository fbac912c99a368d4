// Owners invite people by e-mail: the mail arrives in the fake mailbox, its link makes the account
// (or adds a signed-in person) with the invited role, once; expired, used, revoked and unknown links
// get a clear page.
import { createHash } from "node:crypto";
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { anonymous, signIn, type Session } from "../../helpers/app";
import { pageText, submitForm } from "../../helpers/form";
import { addToFarm, appDb, linkIn, mailFor, makeFarm, makePerson, uniq, waitForMail, type Person } from "./fixtures";

let c: pg.Client;
let farm: string;
let farmName: string;
let otherFarm: string;
let owner: Person;
let owner2: Person;
const sessions = {} as Record<"owner" | "keeper" | "viewer" | "owner2", Session>;

const newAddress = (who: string) => `${who}-${uniq()}@example.org`;
const text = async (s: Session, path: string) => pageText(await (await s.fetch(path)).text());

async function invite(email: string, role: "owner" | "keeper" | "viewer", as = sessions.owner, farmId = farm) {
  return as.fetch(`/api/farms/${farmId}/invitations`, { method: "POST", json: { email, role } });
}
async function inviteAndRead(email: string, role: "owner" | "keeper" | "viewer") {
  const res = await invite(email, role);
  expect(res.status, await res.clone().text()).toBe(201);
  const body = (await res.json()) as { invitation: { id: string } };
  const mails = await waitForMail(email);
  return { id: body.invitation.id, link: linkIn(mails.at(-1)!, "/join/"), mail: mails.at(-1)! };
}

beforeAll(async () => {
  c = await appDb();
  farmName = `Beech Lane Worms ${uniq()}`;
  farm = await makeFarm(c, farmName);
  otherFarm = await makeFarm(c);
  owner = await makePerson(c, "Olwen Owner");
  const keeper = await makePerson(c, "Kit Keeper");
  const viewer = await makePerson(c, "Vera Viewer");
  owner2 = await makePerson(c, "Other Owner");
  await addToFarm(c, farm, owner.id, "owner");
  await addToFarm(c, farm, keeper.id, "keeper");
  await addToFarm(c, farm, viewer.id, "viewer");
  await addToFarm(c, otherFarm, owner2.id, "owner");
  sessions.owner = await signIn(owner.email, owner.password);
  sessions.keeper = await signIn(keeper.email, keeper.password);
  sessions.viewer = await signIn(viewer.email, viewer.password);
  sessions.owner2 = await signIn(owner2.email, owner2.password);
});

afterAll(async () => {
  await c?.end();
});

describe("inviting someone to the team", () => {
  it("the invitation mail arrives, and following its link creates the account with the invited role", async () => {
    const email = newAddress("new-keeper");
    const res = await invite(email, "keeper");
    expect(res.status).toBe(201);
    const body = (await res.json()) as { invitation: Record<string, unknown> };
    expect(body.invitation).toMatchObject({ email, role: "keeper" });
    expect(Object.keys(body.invitation).sort()).toEqual(["createdAt", "email", "expiresAt", "id", "role"]);
    const days = (Date.parse(body.invitation.expiresAt as string) - Date.now()) / 86_400_000;
    expect(days).toBeGreaterThan(6.99);
    expect(days).toBeLessThanOrEqual(7);

    const [mail] = await waitForMail(email);
    expect(mail!.subject).toBe(`[Wormward] Olwen Owner invited you to ${farmName}`);
    expect(mail!.text).toContain("as a keeper");
    const link = linkIn(mail!, "/join/");
    // Only the sha256 of the token is stored.
    const token = link.slice("/join/".length);
    const row = await c.query(`select token_hash from invitations where id = $1`, [body.invitation.id]);
    expect(row.rows[0].token_hash).toBe(createHash("sha256").update(token).digest("hex"));

    const page = await text(anonymous(), link);
    expect(page).toContain(`Join ${farmName}`);
    expect(page).toContain(`Olwen Owner invited ${email} as a keeper`);

    const joined = await submitForm(anonymous(), link, { name: "Nell New", password: "castings-and-coffee" });
    expect(joined.status).toBe(303);
    expect(joined.location).toBe(`/sign-in?notice=joined&next=${encodeURIComponent(`/farms/${farm}`)}`);

    const me = await signIn(email, "castings-and-coffee");
    const farmRes = await me.fetch(`/api/farms/${farm}`);
    expect(farmRes.status).toBe(200);
    expect(((await farmRes.json()) as { role: string }).role).toBe("keeper");
    const team = (await (await sessions.owner.fetch(`/api/farms/${farm}/members`)).json()) as {
      members: { name: string; role: string; email: string }[];
      invitations: { email: string }[];
    };
    expect(team.members).toContainEqual(expect.objectContaining({ name: "Nell New", role: "keeper", email }));
    expect(team.invitations.map((i) => i.email)).not.toContain(email);

    // The link worked once.
    expect(await text(anonymous(), link)).toContain("This invitation has already been used.");
  });

  it("a keeper or a viewer cannot invite (403), and no mail goes out", async () => {
    const email = newAddress("not-invited");
    for (const s of [sessions.keeper, sessions.viewer]) {
      const res = await invite(email, "viewer", s);
      expect(res.status).toBe(403);
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe("forbidden");
    }
    const n = await c.query(`select count(*)::int as n from invitations where email = $1`, [email]);
    expect(n.rows[0].n).toBe(0);
    expect(await mailFor(email)).toEqual([]);
  });

  it("a bad e-mail or role is refused with the field named", async () => {
    const bad = await sessions.owner.fetch(`/api/farms/${farm}/invitations`, { method: "POST", json: { email: "not-an-address", role: "keeper" } });
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { error: { field: string } }).error.field).toBe("email");
    const role = await sessions.owner.fetch(`/api/farms/${farm}/invitations`, { method: "POST", json: { email: newAddress("x"), role: "boss" } });
    expect(role.status).toBe(422);
    expect(((await role.json()) as { error: { field: string } }).error.field).toBe("role");
  });

  it("someone already on the team cannot be invited again (409)", async () => {
    const res = await invite(owner.email.toUpperCase(), "viewer");
    expect(res.status).toBe(409);
    expect(((await res.json()) as { error: { message: string } }).error.message).toContain("already on the team");
  });

  it("a short password or a missing name is refused with the field named, and the link still works", async () => {
    const email = newAddress("careful");
    const { link } = await inviteAndRead(email, "viewer");
    const res = await submitForm(anonymous(), link, { name: "", password: "short" }, "password");
    expect(res.status).toBe(200);
    expect(res.text).toContain("Tell the team your name.");
    expect(res.text).toContain("Use at least 10 characters.");
    const n = await c.query(`select count(*)::int as n from users where email = $1`, [email]);
    expect(n.rows[0].n).toBe(0);
    expect(await text(anonymous(), link)).toContain("Join the team");
  });

  it("a signed-in person with the invited e-mail just joins", async () => {
    const p = await makePerson(c, "Sam Signedin");
    const s = await signIn(p.email, p.password);
    const { link } = await inviteAndRead(p.email, "viewer");
    expect(await text(s, link)).toContain(`Join ${farmName}`);
    const res = await submitForm(s, link, {}, "token");
    expect(res.status).toBe(303);
    expect(res.location).toBe(`/farms/${farm}`);
    expect(((await (await s.fetch(`/api/farms/${farm}`)).json()) as { role: string }).role).toBe("viewer");
  });

  it("an existing account that is signed out is asked to sign in first", async () => {
    const p = await makePerson(c, "Ada Account");
    const { link } = await inviteAndRead(p.email, "keeper");
    const html = await (await anonymous().fetch(link)).text();
    expect(pageText(html)).toContain("already has a Wormward account");
    expect(html).toContain(`href="/sign-in?next=${encodeURIComponent(link)}"`);
    expect(html).not.toContain('name="password"');
  });

  it("someone signed in with another address cannot take the invitation", async () => {
    const { link } = await inviteAndRead(newAddress("meant-for-me"), "owner");
    const page = await text(sessions.keeper, link);
    expect(page).toContain("but this invitation is for");
    expect(page).not.toContain("Join the team");
  });

  it("an expired invitation gets a clear page", async () => {
    const { id, link } = await inviteAndRead(newAddress("slow"), "viewer");
    await c.query(`update invitations set expires_at = now() - interval '1 second' where id = $1`, [id]);
    const page = await text(anonymous(), link);
    expect(page).toContain("This invitation has expired (links last 7 days).");
    expect(page).not.toContain("Join the team");
  });

  it("an unknown link gets a clear page", async () => {
    expect(await text(anonymous(), "/join/this-is-not-a-token-anyone-sent")).toContain("This invitation link is not valid.");
  });

  it("a revoked invitation's link no longer works", async () => {
    const email = newAddress("revoked");
    const { id, link } = await inviteAndRead(email, "keeper");
    const listed = (await (await sessions.owner.fetch(`/api/farms/${farm}/invitations`)).json()) as { invitations: { id: string }[] };
    expect(listed.invitations.map((i) => i.id)).toContain(id);
    expect((await sessions.owner.fetch(`/api/farms/${farm}/invitations/${id}`, { method: "DELETE" })).status).toBe(204);
    expect(await text(anonymous(), link)).toContain("This invitation link is not valid.");
    const after = (await (await sessions.owner.fetch(`/api/farms/${farm}/invitations`)).json()) as { invitations: { id: string }[] };
    expect(after.invitations.map((i) => i.id)).not.toContain(id);
    expect((await sessions.owner.fetch(`/api/farms/${farm}/invitations/${id}`, { method: "DELETE" })).status).toBe(404);
  });

  it("inviting the same address again replaces the earlier link", async () => {
    const email = newAddress("twice");
    const first = await inviteAndRead(email, "viewer");
    const res = await invite(email, "keeper");
    expect(res.status).toBe(201);
    const second = linkIn((await waitForMail(email, 2)).at(-1)!, "/join/");
    expect(second).not.toBe(first.link);
    expect(await text(anonymous(), first.link)).toContain("This invitation link is not valid.");
    expect(await text(anonymous(), second)).toContain("as a keeper");
  });

  it("owners list open invitations; keepers and viewers may not (403)", async () => {
    const res = await sessions.owner.fetch(`/api/farms/${farm}/invitations`);
    expect(res.status).toBe(200);
    const body = (await res.json()) as { invitations: Record<string, unknown>[] };
    expect(body.invitations.length).toBeGreaterThan(0);
    for (const i of body.invitations) expect(i).not.toHaveProperty("tokenHash");
    expect((await sessions.keeper.fetch(`/api/farms/${farm}/invitations`)).status).toBe(403);
    expect((await sessions.viewer.fetch(`/api/farms/${farm}/invitations`)).status).toBe(403);
  });

  it("another farm's invitation ids get 404 and the invitation stays", async () => {
    const res = await invite(newAddress("elsewhere"), "keeper", sessions.owner2, otherFarm);
    expect(res.status).toBe(201);
    const { invitation } = (await res.json()) as { invitation: { id: string } };
    expect((await sessions.owner.fetch(`/api/farms/${farm}/invitations/${invitation.id}`, { method: "DELETE" })).status).toBe(404);
    expect((await sessions.owner.fetch(`/api/farms/${otherFarm}/invitations/${invitation.id}`, { method: "DELETE" })).status).toBe(404);
    expect(
      (await sessions.owner.fetch(`/api/farms/${otherFarm}/invitations`, { method: "POST", json: { email: newAddress("y"), role: "keeper" } })).status,
    ).toBe(404);
    expect((await sessions.owner.fetch(`/api/farms/${farm}/invitations/not-a-uuid`, { method: "DELETE" })).status).toBe(404);
    const still = await c.query(`select count(*)::int as n from invitations where id = $1`, [invitation.id]);
    expect(still.rows[0].n).toBe(1);
  });
});
