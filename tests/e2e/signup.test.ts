// From nothing to a farm on a phone (390×844): a new person signs up, opens the link from the fake
// mailbox, signs in, starts a farm and lands on its Today. And a person on two farms uses the
// header's switcher to reach the other one, which "/" then remembers.
import type pg from "pg";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { addToFarm, appDb, linkIn, makeFarm, makePerson, uniq, waitForMail } from "../integration/team/fixtures";

const SLOW = { timeout: 20_000 };
let browser: Browser;
let c: pg.Client;

async function page(): Promise<Page> {
  return (await browser.newContext(PHONE)).newPage();
}

beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
});
afterAll(async () => {
  await browser?.close();
  await c?.end();
});

describe("a new person on a phone", () => {
  it("signs up, confirms the address from the mail, starts a farm and lands on its Today", async () => {
    const started = Date.now();
    const email = `first-farmer-${uniq()}@example.org`;
    const password = "worms-eat-my-peelings";
    const farmName = `Hazel Shed ${uniq()}`;
    const p = await page();
    await p.goto(`${appUrl()}/sign-in`);
    await p.getByRole("link", { name: "Make an account" }).click();
    await p.getByLabel("Your name").fill("Fiadh First");
    await p.getByLabel("E-mail").fill(email);
    await p.getByLabel("Password").fill(password);
    await p.getByRole("button", { name: "Make my account" }).click();
    await p.waitForURL("**/check-mail", SLOW);
    await expect.poll(() => p.getByRole("heading", { name: "Check your mail" }).count()).toBe(1);

    const link = linkIn((await waitForMail(email))[0]!, "/verify/");
    await p.goto(`${appUrl()}${link}`);
    await p.getByRole("button", { name: "Confirm my address" }).click();
    await p.waitForURL("**/sign-in?notice=verified", SLOW);
    await p.getByLabel("E-mail").fill(email);
    await p.getByLabel("Password").fill(password);
    await p.getByRole("button", { name: "Sign in" }).click();
    await expect.poll(() => p.getByRole("heading", { name: "No farm yet" }).count(), SLOW).toBe(1);

    // The phone's own time zone is filled in (Chromium's: the test machine's).
    const phoneZone = await p.evaluate(() => Intl.DateTimeFormat().resolvedOptions().timeZone);
    await expect.poll(() => p.getByLabel("Time zone").inputValue()).toBe(phoneZone);
    await p.getByLabel("Farm name").fill(farmName);
    await p.getByRole("button", { name: "Start the farm" }).click();
    await p.waitForURL(/\/farms\/[0-9a-f-]{36}$/, SLOW);
    const farmId = new URL(p.url()).pathname.split("/").pop()!;
    const row = await c.query(
      `select f.name, f.timezone, m.role from farms f join memberships m on m.farm_id = f.id join users u on u.id = m.user_id where f.id = $1 and u.email = $2`,
      [farmId, email],
    );
    expect(row.rows[0]).toMatchObject({ name: farmName, role: "owner" });
    await expect.poll(() => p.getByRole("navigation", { name: "Farm" }).getByRole("link", { name: "Today" }).getAttribute("aria-current")).toBe("page");
    await expect.poll(() => p.getByText(farmName).count()).toBeGreaterThan(0);
    await p.screenshot({ path: screenshotPath("signup-first-farm"), fullPage: true });
    console.log(`sign-up to a farm's Today: ${((Date.now() - started) / 1000).toFixed(1)} s`);
    await p.context().close();
  });
});

describe("a person on two farms", () => {
  it("reaches the other farm with the header's switcher, and '/' then opens it", async () => {
    const person = await makePerson(c, "Two Farms");
    const first = await makeFarm(c, `Aaa Alder ${uniq()}`);
    const second = await makeFarm(c, `Zzz Zelkova ${uniq()}`);
    await addToFarm(c, first, person.id, "owner");
    await addToFarm(c, second, person.id, "keeper");
    const secondName = (await c.query(`select name from farms where id = $1`, [second])).rows[0].name as string;
    const p = await page();
    await p.goto(`${appUrl()}/sign-in`);
    await p.getByLabel("E-mail").fill(person.email);
    await p.getByLabel("Password").fill(person.password);
    await p.getByRole("button", { name: "Sign in" }).click();
    await p.waitForURL(`**/farms/${first}`, SLOW);
    await p.locator("summary", { hasText: "Aaa Alder" }).click();
    await p.getByRole("link", { name: secondName }).click();
    await p.waitForURL(`**/farms/${second}`, SLOW);
    await expect.poll(() => p.locator("summary").first().textContent()).toBe(`Farm: ${secondName}`);
    await p.screenshot({ path: screenshotPath("farm-switcher"), fullPage: false });
    await p.goto(`${appUrl()}/`);
    await p.waitForURL(`**/farms/${second}`, SLOW);
    await p.context().close();
  });
});
