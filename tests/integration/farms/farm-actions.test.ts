// The "your farms" and "your data" pages' forms over HTTP, as a browser without script posts them:
// each checks the session and the role on the server, whatever the form that was posted.
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { anonymous, signIn, type Session } from "../../helpers/app";
import { loadForm, pageText } from "../../helpers/form";
import { addToFarm, appDb, makeFarm, makePerson, type Person } from "../team/fixtures";
import { LAST_OWNER_CANNOT_LEAVE } from "@/lib/server/farms/leave-farm";

let c: pg.Client;
let owner: Person;
let keeper: Person;
let farm: string;
let ownerS: Session;
let keeperS: Session;
const farmName = async (id: string) => (await c.query(`select name from farms where id = $1`, [id])).rows[0]?.name as string | undefined;

beforeAll(async () => {
  c = await appDb();
  owner = await makePerson(c, "Form Owner");
  keeper = await makePerson(c, "Form Keeper");
  farm = await makeFarm(c);
  await addToFarm(c, farm, owner.id, "owner");
  await addToFarm(c, farm, keeper.id, "keeper");
  ownerS = await signIn(owner.email, owner.password);
  keeperS = await signIn(keeper.email, keeper.password);
});
afterAll(async () => {
  await c?.end();
});

const deleteForm = (s: Session, id: string) => loadForm(s, "/me/farms", (html) => html.includes(`value="${id}"`) && html.includes('name="confirm"'));
const leaveForm = (s: Session, id: string) => loadForm(s, "/me/farms", (html) => html.includes(`value="${id}"`) && !html.includes('name="confirm"'));

// The owner's delete form, posted with another session: the same fields and action a forged post carries.
async function forged(s: Session, farmId: string, confirm: string) {
  const mixed: Session = { cookie: s.cookie, fetch: (path, init) => (init?.method === "POST" ? s : ownerS).fetch(path, init) };
  return (await deleteForm(mixed, farmId)).submit({ confirm });
}

describe("your farms: leave and delete", () => {
  it("a keeper cannot delete the farm, even by posting the owner's form", async () => {
    const name = (await farmName(farm))!;
    const res = await forged(keeperS, farm, name);
    // Refused: no redirect to the list (the owner's answer), and the farm is all there.
    expect(res.status).toBe(200);
    expect(res.location).toBeNull();
    expect(await farmName(farm)).toBe(name);
    // Signed out, the same post is sent to sign in.
    expect((await forged(anonymous(), farm, name)).status).toBe(307);
    expect(await farmName(farm)).toBe(name);
  });

  it("the last owner cannot leave, and is told to hand over first", async () => {
    const res = await (await leaveForm(ownerS, farm)).submit({});
    expect(res.text).toContain(LAST_OWNER_CANNOT_LEAVE);
    expect((await c.query(`select 1 from memberships where user_id = $1 and farm_id = $2`, [owner.id, farm])).rowCount).toBe(1);
  });

  it("a keeper leaves the farm", async () => {
    const res = await (await leaveForm(keeperS, farm)).submit({});
    expect(res.status).toBe(303);
    expect(res.location).toBe("/me/farms?notice=left");
    const page = pageText(await (await keeperS.fetch(res.location!)).text());
    expect(page).toContain("You have left the farm.");
    expect(page).not.toContain((await farmName(farm))!);
    expect((await c.query(`select 1 from memberships where user_id = $1 and farm_id = $2`, [keeper.id, farm])).rowCount).toBe(0);
  });

  it("the owner deletes the farm only with its name typed", async () => {
    const name = (await farmName(farm))!;
    const wrong = await (await deleteForm(ownerS, farm)).submit({ confirm: "the farm" });
    expect(wrong.text).toContain(`Type the farm's name, ${name}, exactly as shown`);
    expect(await farmName(farm)).toBe(name);
    const res = await (await deleteForm(ownerS, farm)).submit({ confirm: name });
    expect(res.status).toBe(303);
    expect(res.location).toBe("/me/farms");
    expect(await farmName(farm)).toBeUndefined();
  });

  it("signed out, the pages send to sign-in and the data download answers 401", async () => {
    const page = await anonymous().fetch("/me/farms");
    expect(page.status).toBe(307);
    expect(page.headers.get("location")).toContain("/sign-in");
    expect((await anonymous().fetch("/api/me/data")).status).toBe(401);
  });
});

describe("your data", () => {
  it("downloads as a JSON file holding the person and their owned farm", async () => {
    const p = await makePerson(c, "Data Owner");
    const f = await makeFarm(c);
    await addToFarm(c, f, p.id, "owner");
    const res = await (await signIn(p.email, p.password)).fetch("/api/me/data");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="wormward-my-data-\d{4}-\d{2}-\d{2}\.json"$/);
    const body = (await res.json()) as { you: { email: string }; farmsYouOwn: { farm: { id: string } }[] };
    expect(body.you.email).toBe(p.email);
    expect(body.farmsYouOwn.map((x) => x.farm.id)).toEqual([f]);
  });

  it("deleting the account takes the typed words, then signs no one in", async () => {
    const p = await makePerson(c, "Going Person");
    const s = await signIn(p.email, p.password);
    const wrong = await (await loadForm(s, "/me/data", "confirm")).submit({ confirm: "bye" });
    expect(wrong.text).toContain('Type "delete my account" to delete your account.');
    const res = await (await loadForm(s, "/me/data", "confirm")).submit({ confirm: "delete my account" });
    expect(res.status).toBe(303);
    expect(res.location).toBe("/sign-in");
    expect((await c.query(`select 1 from users where id = $1`, [p.id])).rowCount).toBe(0);
    expect((await s.fetch("/api/me")).status).toBe(401);
    await expect(signIn(p.email, p.password)).rejects.toThrow(/sign-in failed/);
  });
});
