// Setting a password and what a reset does to the sessions signed in before it, against the
// running app, the fake mailbox and the app's database.
import bcrypt from "bcryptjs";
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { anonymous, signIn, trySignIn } from "../../helpers/app";
import { pageText, submitForm } from "../../helpers/form";
import { appDb, linkIn, makePerson, waitForMail, type Person } from "../team/fixtures";
import { PASSWORD_TOO_LONG } from "@/lib/domain/password-rules";

let c: pg.Client;
const people: Person[] = [];
// The wrong try below comes from a made-up address of its own (RFC 5737), not the suite's 127.0.0.1.
const FROM = "198.51.100.71";
beforeAll(async () => {
  c = await appDb();
});
afterAll(async () => {
  await c.query(`delete from sign_in_failures where key = any($1)`, [[`address:${FROM}`, ...people.map((p) => `account:${p.email}`)]]);
  if (people.length) await c.query(`delete from users where id = any($1)`, [people.map((p) => p.id)]);
  await c?.end();
});

async function resetLinkFor(name: string): Promise<{ p: Person; link: string }> {
  const p = await makePerson(c, name);
  people.push(p);
  await submitForm(anonymous(), "/forgot", { email: p.email });
  return { p, link: linkIn((await waitForMail(p.email))[0]!, "/reset/") };
}

describe("passwords", () => {
  it("a password over 72 bytes is refused with a message", async () => {
    const { p, link } = await resetLinkFor("Long Word Willow");
    // 37 characters but 74 bytes in UTF-8: bcrypt would read only the first 72 bytes.
    const tooLong = "ü".repeat(37);
    const res = await submitForm(anonymous(), link, { password: tooLong }, "password");
    expect(res.status).toBe(200);
    expect(res.text).toContain(PASSWORD_TOO_LONG);
    // Nothing was set: the old password still signs in, and the link still offers the form.
    await expect(signIn(p.email, p.password)).resolves.toBeDefined();
    expect(pageText(await (await anonymous().fetch(link)).text())).toContain("New password");
    // Exactly 72 bytes is fine, and all of it counts.
    const justRight = "ü".repeat(36);
    const done = await submitForm(anonymous(), link, { password: justRight }, "password");
    expect(done.status).toBe(303);
    await expect(signIn(p.email, justRight)).resolves.toBeDefined();
    expect((await trySignIn(p.email, "ü".repeat(35), FROM)).error).toBe("CredentialsSignin");
  });

  it("a password reset ends the person's other sessions", async () => {
    const { p, link } = await resetLinkFor("Two Phones Hazel");
    const phone = await signIn(p.email, p.password);
    const laptop = await signIn(p.email, p.password);
    expect((await phone.fetch("/api/me")).status).toBe(200);
    expect((await laptop.fetch("/me")).status).toBe(200);

    const done = await submitForm(anonymous(), link, { password: "a-brand-new-passphrase" }, "password");
    expect(done.status).toBe(303);

    // The cookies from before the reset are worth nothing now: 401 from the API, sign-in for pages.
    const api = await phone.fetch("/api/me");
    expect(api.status).toBe(401);
    expect(((await api.json()) as { error: { code: string } }).error.code).toBe("unauthenticated");
    const page = await laptop.fetch("/me");
    expect(page.status).toBe(307);
    expect(new URL(page.headers.get("location")!, "http://x").pathname).toBe("/sign-in");
    // A fresh sign-in with the new password works.
    const fresh = await signIn(p.email, "a-brand-new-passphrase");
    expect((await fresh.fetch("/api/me")).status).toBe(200);
    expect((await fresh.fetch("/me")).status).toBe(200);
  });

  it("a password stored at the old cost is stored again at cost 12 when its person signs in", async () => {
    const p = await makePerson(c, "Old Hash Sorrel");
    people.push(p);
    await c.query(`update users set password_hash = $2 where id = $1`, [p.id, await bcrypt.hash(p.password, 10)]);
    await signIn(p.email, p.password);
    const stored = (await c.query(`select password_hash from users where id = $1`, [p.id])).rows[0].password_hash as string;
    expect(bcrypt.getRounds(stored)).toBe(12);
    expect(await bcrypt.compare(p.password, stored)).toBe(true);
    await expect(signIn(p.email, p.password)).resolves.toBeDefined();
  });
});
