// After sign-in, only our own pages: a `next` that a browser would read as another site lands on
// Today. Debian's Chromium signs in through the real form, so the browser's own reading of
// backslashes and tabs is what is tested; a request to evil.example would be seen and fail the test.
import type pg from "pg";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE } from "../helpers/browser";
import { addToFarm, appDb, makeFarm, makePerson, type Person } from "../integration/team/fixtures";

let browser: Browser;
let c: pg.Client;
let farm: string;
let me: Person;

beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
  me = await makePerson(c, "Next Param Rowan");
  farm = await makeFarm(c);
  await addToFarm(c, farm, me.id, "owner");
});
afterAll(async () => {
  await browser?.close();
  if (farm) await c.query(`delete from farms where id = $1`, [farm]);
  if (me) await c.query(`delete from users where id = $1`, [me.id]);
  await c?.end();
});

// Signs in at /sign-in?<query> and returns the page's address once the browser has gone on.
async function signInWith(query: string) {
  const context = await browser.newContext(PHONE);
  const page = await context.newPage();
  const elsewhere: string[] = [];
  page.on("request", (r) => {
    if (!r.url().startsWith(appUrl())) elsewhere.push(r.url());
  });
  page.on("dialog", (d) => {
    elsewhere.push(`dialog: ${d.message()}`);
    void d.dismiss();
  });
  await page.goto(`${appUrl()}/sign-in?${query}`);
  await page.getByLabel("E-mail").fill(me.email);
  await page.getByLabel("Password").fill(me.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((u) => u.pathname !== "/sign-in", { timeout: 20_000 }).catch(() => undefined);
  await page.waitForLoadState("load");
  const heading = await page
    .getByRole("heading", { level: 1 })
    .first()
    .textContent()
    .catch(() => null);
  const url = page.url();
  await context.close();
  return { url, heading, elsewhere };
}

describe("after sign-in, only our own pages", () => {
  it("next=/me still goes to that page of ours", async () => {
    const r = await signInWith("next=/me");
    expect(new URL(r.url).origin).toBe(appUrl());
    expect(new URL(r.url).pathname).toBe("/me");
    expect(r.elsewhere).toEqual([]);
  });

  const away = [
    "next=/%5Cevil.example",
    "next=/%09/evil.example",
    "next=//evil.example",
    "next=/\\evil.example",
    "next=/./%5Cevil.example",
    "next=https://evil.example",
    "next=javascript:alert(document.domain)",
  ];
  for (const query of away) {
    it(`${query} lands on Today`, async () => {
      const r = await signInWith(query);
      expect(r.elsewhere).toEqual([]);
      expect(new URL(r.url).origin).toBe(appUrl());
      expect(new URL(r.url).pathname).toBe(`/farms/${farm}`);
      expect(r.heading).toBe("Today");
    });
  }
});
