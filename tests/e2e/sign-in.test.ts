import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

const PEOPLE = [
  { role: "owner", email: "noor@alder-row.example" },
  { role: "keeper", email: "tomas@alder-row.example" },
  { role: "viewer", email: "class5b@alder-row.example" },
];

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
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
    await expect.poll(() => page.getByText("do not match").count()).toBe(1);
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
      await expect.poll(() => page.getByRole("heading", { name: "Today" }).count()).toBe(1);
      for (const bin of ["Long Bed North", "Shed Tote", "Tray Tower", "Greenhouse Windrow"]) {
        expect(await page.getByRole("region", { name: bin }).count(), bin).toBe(1);
      }
      // Ten zones in the demo, each showing a temperature with a status word beside it.
      expect(await page.getByText("Temperature", { exact: true }).count()).toBe(10);
      await page.screenshot({ path: screenshotPath(`today-${p.role}`), fullPage: true });
      await page.getByRole("button", { name: "Sign out" }).click();
      await page.waitForURL(/\/sign-in/);
      await page.context().close();
    });
  }
});
