// Making an account against the running app and the fake mailbox: the confirmation link arrives,
// works once within 24 hours, and the screen reads the same whether or not the address is taken.
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { anonymous, signIn } from "../../helpers/app";
import { pageText, submitForm } from "../../helpers/form";
import { appDb, linkIn, mailFor, makePerson, uniq, waitForMail } from "../team/fixtures";
import { SIGN_UP_ANSWER } from "@/lib/server/auth/sign-up";

let c: pg.Client;
beforeAll(async () => {
  c = await appDb();
});
afterAll(async () => {
  await c?.end();
});

const password = "castings-by-the-bucket";
const signUp = (email: string, name = "New Nettle") => submitForm(anonymous(), "/sign-up", { name, email, password }, "email");
const answerOf = async (res: Awaited<ReturnType<typeof signUp>>) => {
  expect(res.status).toBe(303);
  expect(res.location).toBe("/check-mail");
  return pageText(await (await anonymous().fetch(res.location!)).text());
};
const confirm = (path: string) => submitForm(anonymous(), path, {}, "token");

describe("sign up with e-mail verification", () => {
  const email = `new-nettle-${uniq()}@example.org`;
  let link: string;

  it("a new address gets a confirmation mail whose token is stored only as a hash", async () => {
    const page = await answerOf(await signUp(email));
    expect(page).toContain(SIGN_UP_ANSWER);
    const [mail] = await waitForMail(email);
    expect(mail!.subject).toBe("[Wormward] Confirm your e-mail address");
    expect(mail!.text).toContain("works once, for 24 hours");
    link = linkIn(mail!, "/verify/");
    const token = link.split("/").pop()!;
    const rows = await c.query(
      `select v.token_hash, extract(epoch from v.expires_at - v.created_at)::int as life, u.email_verified_at from email_verifications v join users u on u.id = v.user_id where u.email = $1`,
      [email],
    );
    expect(rows.rows).toHaveLength(1);
    expect(rows.rows[0].token_hash).toMatch(/^[0-9a-f]{64}$/);
    expect(rows.rows[0].token_hash).not.toContain(token);
    expect(rows.rows[0].life).toBe(24 * 3600);
    expect(rows.rows[0].email_verified_at).toBeNull();
  });

  it("an unverified account signs in only to the check-your-mail screen", async () => {
    const s = await signIn(email, password);
    for (const path of ["/", "/me", "/farms/new"]) {
      const res = await s.fetch(path);
      expect(res.status, path).toBe(307);
      expect(res.headers.get("location"), path).toMatch(/\/check-mail$/);
    }
    const page = pageText(await (await s.fetch("/check-mail")).text());
    expect(page).toContain(`Confirm ${email} before using Wormward`);
    expect(page).toContain("Send the link again");
    // Starting a farm over the API is refused as well.
    const api = await s.fetch("/api/farms", { method: "POST", json: { name: "Sneaky farm" } });
    expect(api.status).toBe(403);
  });

  it("the link confirms the address once; used again it is refused", async () => {
    const res = await confirm(link);
    expect(res.status).toBe(303);
    expect(res.location).toBe("/sign-in?notice=verified");
    const rows = await c.query(`select email_verified_at from users where email = $1`, [email]);
    expect(rows.rows[0].email_verified_at).not.toBeNull();
    const s = await signIn(email, password);
    const home = pageText(await (await s.fetch("/")).text());
    expect(home).toContain("No farm yet");
    expect(home).toContain("Start the farm");
    const again = pageText(await (await anonymous().fetch(link)).text());
    expect(again).toContain("This link has already been used.");
  });

  it("a second sign-up for a registered address reads the same and mails 'you already have an account'", async () => {
    const known = await makePerson(c, "Known Knotweed");
    const page = await answerOf(await signUp(known.email.toUpperCase(), "Someone Else"));
    expect(page).toContain(SIGN_UP_ANSWER);
    const [mail] = await waitForMail(known.email);
    expect(mail!.subject).toBe("[Wormward] You already have an account");
    expect(mail!.text).toContain("Hello Known Knotweed");
    expect(mail!.text).not.toContain("/verify/");
    // The existing account is untouched: its password still signs in, the new one does not.
    await expect(signIn(known.email, known.password)).resolves.toBeDefined();
    await expect(signIn(known.email, password)).rejects.toThrow(/sign-in failed/);
    const n = await c.query(`select count(*)::int as n from users where lower(email) = lower($1)`, [known.email]);
    expect(n.rows[0].n).toBe(1);
  });

  it("an expired link is refused and confirms nothing", async () => {
    const late = `late-lupin-${uniq()}@example.org`;
    await signUp(late, "Late Lupin");
    const path = linkIn((await waitForMail(late))[0]!, "/verify/");
    await c.query(`update email_verifications set expires_at = now() - interval '1 minute' where user_id = (select id from users where email = $1)`, [late]);
    const page = pageText(await (await anonymous().fetch(path)).text());
    expect(page).toContain("This link has expired");
    expect(page).not.toContain("Confirm my address");
    const rows = await c.query(`select email_verified_at from users where email = $1`, [late]);
    expect(rows.rows[0].email_verified_at).toBeNull();
  });

  it("resend is limited to 3 sign-up mails an hour, with the same answer each time", async () => {
    const busy = `busy-burdock-${uniq()}@example.org`;
    await signUp(busy, "Busy Burdock");
    await waitForMail(busy);
    const s = await signIn(busy, password);
    for (let i = 0; i < 4; i++) expect((await submitForm(s, "/check-mail", {}, () => true)).text).toContain("a new link is on its way");
    await waitForMail(busy, 3);
    // A control mail asked after the last resend has arrived, so a fourth would have too.
    const control = `control-${uniq()}@example.org`;
    await signUp(control, "Control Case");
    await waitForMail(control);
    expect(await mailFor(busy)).toHaveLength(3);
  });

  it("the sign-in page links to making an account", async () => {
    const html = await (await anonymous().fetch("/sign-in")).text();
    expect(html).toMatch(/<a[^>]*href="\/sign-up"[^>]*>Make an account<\/a>/);
  });
});
