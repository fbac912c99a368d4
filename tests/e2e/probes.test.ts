import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, demoFarmId } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

let browser: Browser;
let demoFarm: string;
beforeAll(async () => {
  browser = await launchBrowser();
  demoFarm = await demoFarmId();
});
afterAll(async () => {
  await browser?.close();
});

async function signedIn(email: string): Promise<Page> {
  const page = await (await browser.newContext(PHONE)).newPage();
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("alder-row-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/farms\//);
  return page;
}

describe("the probes page", () => {
  it("an owner registers a probe and sees its token once", async () => {
    const page = await signedIn("noor@alder-row.example");
    // Other test files may have given the owner more farms; work in the demo farm.
    await page.goto(`${appUrl()}/farms/${demoFarm}`);
    await page.getByRole("navigation", { name: "Farm" }).getByRole("link", { name: "Probes" }).click();
    await page.waitForURL(/\/probes$/);
    const code = `tray-${Date.now().toString(36)}`;
    await page.getByLabel("Probe code").fill(code);
    await page.locator("select[name=zoneId]").selectOption({ index: 1 });
    await page.getByRole("button", { name: "Register" }).click();
    const box = page.getByRole("status");
    await expect.poll(() => box.textContent()).toContain(`Token for ${code}`);
    expect(await box.textContent()).toContain(`wormward/${code}/readings`);
    await page.screenshot({ path: screenshotPath("probes-token"), fullPage: true });
    await page.getByRole("button", { name: "I have copied it" }).click();
    await expect.poll(() => page.getByRole("status").count()).toBe(0);
    expect(await page.getByText(code).count()).toBeGreaterThan(0);
    // A probe that has sent nothing says so, by word and by its own mark.
    const item = page.getByRole("listitem").filter({ hasText: code });
    await expect.poll(() => item.locator("[data-presence]").getAttribute("data-presence")).toBe("no-reading-yet");
    expect(await item.locator("[data-presence]").textContent()).toBe("no reading yet");
    expect(await item.locator("[data-presence] svg").count()).toBe(1);
    expect(await item.textContent()).not.toMatch(/\b(connected|online|offline)\b/);
    await page.context().close();
  });

  it("a viewer sees the probes but no register form", async () => {
    const page = await signedIn("class5b@alder-row.example");
    await page.goto(`${appUrl()}/farms/${demoFarm}/probes`);
    await expect.poll(() => page.getByText("alder-01").count()).toBeGreaterThan(0);
    expect(await page.getByRole("button", { name: "Register" }).count()).toBe(0);
    // Every live probe's presence is one of our words: reporting, silent since hh:mm, or no reading yet.
    const marks = await page.locator("[data-presence]").allTextContents();
    expect(marks.length).toBeGreaterThan(0);
    for (const m of marks) expect(m).toMatch(/^(reporting|silent since (\d{1,2} \w{3} )?\d{2}:\d{2}|no reading yet|archived)$/);
    await page.screenshot({ path: screenshotPath("probes-viewer"), fullPage: true });
    await page.context().close();
  });
});

describe("adding a bin from Today", () => {
  it("an owner adds a bin with two zones and it appears on Today; a keeper has no such button", async () => {
    const page = await signedIn("noor@alder-row.example");
    await page.goto(`${appUrl()}/farms/${demoFarm}`);
    await page.getByRole("button", { name: "Add a bin" }).click();
    const name = `Porch Tote ${Date.now().toString(36)}`;
    await page.getByLabel("Name").fill(name);
    await page.getByLabel("Zones (feeding side to harvest side)").selectOption("2");
    await page.getByRole("button", { name: "Add", exact: true }).click();
    await expect.poll(() => page.getByRole("region", { name, exact: true }).count()).toBe(1);
    const region = page.getByRole("region", { name, exact: true });
    expect(await region.getByText("Temperature", { exact: true }).count()).toBe(2);
    await page.context().close();

    const keeper = await signedIn("tomas@alder-row.example");
    await keeper.goto(`${appUrl()}/farms/${demoFarm}`);
    await expect.poll(() => keeper.getByRole("heading", { name: "Today" }).count()).toBe(1);
    expect(await keeper.getByRole("button", { name: "Add a bin" }).count()).toBe(0);
    await keeper.context().close();
  });
});
