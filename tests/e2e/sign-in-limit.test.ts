// The try limit as a person meets it on the sign-in form: after five wrong passwords (guessed from
// another address, made up from RFC 5737), the right one is refused with the try-again wording.
import type pg from "pg";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, trySignIn } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { appDb, makePerson, type Person } from "../integration/team/fixtures";

const GUESSER = "198.51.100.90";
let browser: Browser;
let c: pg.Client;
let me: Person;

beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
  me = await makePerson(c, "Locked Out Alder");
});
afterAll(async () => {
  await browser?.close();
  if (me) {
    await c.query(`delete from sign_in_failures where key = any($1)`, [[`account:${me.email}`, `address:${GUESSER}`]]);
    await c.query(`delete from users where id = $1`, [me.id]);
  }
  await c?.end();
});

describe("the sign-in form under the try limit", () => {
  it("after five wrong passwords the form says to try again in 15 minutes, even for the right one", async () => {
    for (let i = 0; i < 5; i++) expect((await trySignIn(me.email, `guess-${i}`, GUESSER)).error).toBe("CredentialsSignin");
    const page = await (await browser.newContext(PHONE)).newPage();
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill(me.email);
    await page.getByLabel("Password").fill(me.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect.poll(() => page.getByText(/^Too many tries\. Try again in 1[45] minutes\.$/).count(), { timeout: 15_000 }).toBe(1);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await page.screenshot({ path: screenshotPath("sign-in-too-many-tries") });
    await page.context().close();
  });
});
