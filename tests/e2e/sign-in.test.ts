import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, demoFarmId } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

const PEOPLE = [
  { role: "owner", email: "noor@alder-row.example" },
  { role: "keeper", email: "tomas@alder-row.example" },
  { role: "viewer", email: "class5b@alder-row.example" },
];

const DEMO_BINS = { "Long Bed North": 3, "Shed Tote": 1, "Tray Tower": 3, "Greenhouse Windrow": 3 };
let browser: Browser;
let demoFarm: string;
beforeAll(async () => {
  browser = await launchBrowser();
  demoFarm = await demoFarmId();
});
afterAll(async () => {
  await browser?.close();
});

describe("signing in on a phone", () => {
  it("a signed-out visitor is sent to the sign-in page", async () => {
    const page = await (await browser.newContext(PHONE)).newPage();
    await page.goto(`${appUrl()}/`);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await page.screenshot({ path: screenshotPath("sign-in") });
    await page.context().close();
  });

  it("a wrong password shows an error and stays on the sign-in page", async () => {
    const page = await (await browser.newContext(PHONE)).newPage();
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("noor@alder-row.example");
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    // bcrypt at cost 12 takes a third of a second alone, longer on a busy machine.
    await expect.poll(() => page.getByText("do not match").count(), { timeout: 15_000 }).toBe(1);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await page.context().close();
  });

  for (const p of PEOPLE) {
    it(`the ${p.role} signs in, sees every bin and zone on Today, and signs out`, async () => {
      const page = await (await browser.newContext(PHONE)).newPage();
      await page.goto(`${appUrl()}/sign-in`);
      await page.getByLabel("E-mail").fill(p.email);
      await page.getByLabel("Password").fill("alder-row-demo");
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(/\/farms\/[0-9a-f-]+$/);
      // Other test files may have given this person more farms; open the demo farm's Today.
      if (!page.url().endsWith(demoFarm)) await page.goto(`${appUrl()}/farms/${demoFarm}`);
      await expect.poll(() => page.getByRole("heading", { name: "Today" }).count()).toBe(1);
      for (const [bin, zones] of Object.entries(DEMO_BINS)) {
        const region = page.getByRole("region", { name: bin, exact: true });
        expect(await region.count(), bin).toBe(1);
        // Each zone shows its temperature with a status word beside it.
        expect(await region.getByText("Temperature", { exact: true }).count(), bin).toBe(zones);
      }
      await page.screenshot({ path: screenshotPath(`today-${p.role}`), fullPage: true });
      await page.getByRole("button", { name: "Sign out" }).click();
      await page.waitForURL(/\/sign-in/);
      await page.context().close();
    });
  }
});
