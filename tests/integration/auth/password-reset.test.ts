// "Forgot your password?" against the running app and the fake mailbox: the link arrives, sets a
// new password once, and the answer never tells whether an account exists.
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { anonymous, signIn } from "../../helpers/app";
import { loadForm, pageText, submitForm } from "../../helpers/form";
import { appDb, linkIn, mailFor, makePerson, waitForMail, type Person } from "../team/fixtures";
import { RESET_ANSWER } from "@/lib/server/auth/password-reset";

let c: pg.Client;
beforeAll(async () => {
  c = await appDb();
});
afterAll(async () => {
  await c?.end();
});

const ask = (email: string) => submitForm(anonymous(), "/forgot", { email });
const setPassword = (path: string, password: string) => submitForm(anonymous(), path, { password });

describe("password reset by mail", () => {
  let person: Person;
  let link: string;
  let staleForm: Awaited<ReturnType<typeof loadForm>>;

  it("the reset mail arrives with a link to /reset/", async () => {
    person = await makePerson(c, "Forgetful Fern");
    const res = await ask(person.email.toUpperCase());
    expect(res.status).toBe(200);
    expect(res.text).toContain(RESET_ANSWER);
    const [mail] = await waitForMail(person.email);
    expect(mail!.subject).toBe("[Wormward] Set a new password");
    expect(mail!.text).toContain("Hello Forgetful Fern");
    link = linkIn(mail!, "/reset/");
    // Only the hash is stored: the token in the link is nowhere in the table.
    const token = link.split("/").pop()!;
    const rows = await c.query(`select token_hash from password_resets r join users u on u.id = r.user_id where u.email = $1`, [person.email]);
    expect(rows.rows).toHaveLength(1);
    expect(rows.rows[0].token_hash).not.toContain(token);
    expect(rows.rows[0].token_hash).toMatch(/^[0-9a-f]{64}$/);
  });

  it("a password under 10 characters is refused with the field named, and the link still works", async () => {
    const res = await setPassword(link, "short1");
    expect(res.text).toContain("Use at least 10 characters.");
    expect(pageText(await (await anonymous().fetch(link)).text())).toContain("New password");
  });

  it("the link sets a new password that signs in; the old one no longer does", async () => {
    staleForm = await loadForm(anonymous(), link, "password");
    const res = await setPassword(link, "compost-happens-daily");
    // Done: on to sign in (a 303, as a browser without script gets it), which says so.
    expect(res.status).toBe(303);
    expect(res.location).toBe("/sign-in?notice=password-set");
    expect(pageText(await (await anonymous().fetch(res.location!)).text())).toContain("Your new password is set. Sign in with it.");
    await expect(signIn(person.email, "compost-happens-daily")).resolves.toBeDefined();
    await expect(signIn(person.email, person.password)).rejects.toThrow(/sign-in failed/);
  });

  it("the token cannot be used again", async () => {
    const page = pageText(await (await anonymous().fetch(link)).text());
    expect(page).toContain("This link has already been used.");
    // Posting the form that was loaded before the first use is refused and changes nothing.
    const late = await staleForm.submit({ password: "someone-elses-password" });
    expect(late.status).toBe(200);
    expect(late.text).toContain("This link has already been used.");
    await expect(signIn(person.email, "someone-elses-password")).rejects.toThrow(/sign-in failed/);
    const again = await c.query(
      `select count(*)::int as n from password_resets r join users u on u.id = r.user_id where u.email = $1 and used_at is not null`,
      [person.email],
    );
    expect(again.rows[0].n).toBe(1);
    await expect(signIn(person.email, "compost-happens-daily")).resolves.toBeDefined();
  });

  it("an unknown e-mail gets the same answer and no mail", async () => {
    const nobody = `nobody-${Date.now()}@example.org`;
    const res = await ask(nobody);
    expect(res.status).toBe(200);
    expect(res.text).toContain(RESET_ANSWER);
    // A known address asked after it gets its mail: by then a mail to the unknown one would be there too.
    const known = await makePerson(c, "Control Case");
    await ask(known.email);
    await waitForMail(known.email);
    expect(await mailFor(nobody)).toEqual([]);
  });

  it("an expired link is refused", async () => {
    const p = await makePerson(c, "Late Larch");
    await ask(p.email);
    const path = linkIn((await waitForMail(p.email))[0]!, "/reset/");
    await c.query(`update password_resets set expires_at = now() - interval '1 minute' where user_id = $1`, [p.id]);
    const page = pageText(await (await anonymous().fetch(path)).text());
    expect(page).toContain("This link has expired");
    expect(page).not.toContain("New password");
  });

  it("an unknown token gets a clear page", async () => {
    const page = pageText(await (await anonymous().fetch("/reset/not-a-real-token-at-all-xxxxxxxx")).text());
    expect(page).toContain("This link is not valid.");
  });

  it("at most 3 reset mails go to one address in an hour, with the same answer each time", async () => {
    const p = await makePerson(c, "Busy Birch");
    for (let i = 0; i < 5; i++) expect((await ask(p.email)).text).toContain(RESET_ANSWER);
    await waitForMail(p.email, 3);
    // A control mail asked after the fifth request has arrived, so a fourth would have too.
    const control = await makePerson(c, "Control Case");
    await ask(control.email);
    await waitForMail(control.email);
    expect(await mailFor(p.email)).toHaveLength(3);
    const rows = await c.query(`select count(*)::int as n from password_resets where user_id = $1`, [p.id]);
    expect(rows.rows[0].n).toBe(3);
  });

  it("the sign-in page links to the forgot page", async () => {
    const html = await (await anonymous().fetch("/sign-in")).text();
    expect(html).toMatch(/<a[^>]*href="\/forgot"[^>]*>Forgot your password\?<\/a>/);
  });
});
