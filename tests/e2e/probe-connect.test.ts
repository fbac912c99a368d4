// Registering a probe on a phone (390×844): the token and the connect snippets appear where the
// owner tapped, in view without scrolling, with the focus on them; the curl command read from the
// page stores a reading, and the probe's page turns from waiting to reporting without a reload.
import { execFile } from "node:child_process";
import type { Browser, Locator, Page } from "playwright-core";
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

/** Whether the element lies wholly inside the 390×844 viewport as the page stands (no scrolling by the test). */
async function inView(l: Locator): Promise<boolean> {
  const b = await l.boundingBox();
  return !!b && b.y >= 0 && b.x >= 0 && b.y + b.height <= PHONE.viewport.height && b.x + b.width <= PHONE.viewport.width;
}

function sh(line: string): Promise<{ code: number; stdout: string }> {
  return new Promise((resolve) => {
    execFile("/bin/sh", ["-c", line], { timeout: 20_000 }, (err, stdout) => resolve({ code: err ? 1 : 0, stdout }));
  });
}

describe("connecting a probe from a phone", () => {
  it("the token and the snippets are in view where the owner tapped; the curl command shown turns the probe's page live", async () => {
    const page = await signedIn("noor@alder-row.example");
    await page.goto(`${appUrl()}/farms/${demoFarm}/probes`);
    const code = `bed-${Date.now().toString(36)}`;
    await page.getByLabel("Probe code").fill(code);
    await page.locator("select[name=zoneId]").selectOption({ index: 1 });
    await page.getByRole("button", { name: "Register" }).click();

    const box = page.locator(`[data-connect-probe="${code}"]`);
    await box.waitFor();
    // Let the scroll into view settle, then measure without scrolling.
    await page.waitForTimeout(300);
    const token = box.locator("[data-token]");
    expect((await token.textContent())!.length).toBe(32);
    expect(await inView(token)).toBe(true);
    expect(await inView(box.getByRole("button", { name: "Copy token" }))).toBe(true);
    for (const id of ["mosquitto-pub", "curl", "micropython"]) {
      const snippet = box.locator(`[data-snippet="${id}"]`);
      expect(await inView(snippet.getByRole("button")), `${id} copy button`).toBe(true);
      expect(await inView(snippet.locator("pre")), `${id} text`).toBe(true);
    }
    // The focus moved to the box, so a screen reader starts there too.
    expect(await page.evaluate(() => document.activeElement?.textContent)).toContain(`Token for ${code}`);
    await page.screenshot({ path: screenshotPath("probe-connect") });

    const mosquitto = (await box.locator('[data-snippet="mosquitto-pub"] pre').textContent())!;
    expect(mosquitto).toContain(`-u ${code} -P ${await token.textContent()}`);
    expect(mosquitto).toContain(`-t wormward/${code}/readings`);
    const python = (await box.locator('[data-snippet="micropython"] pre').textContent())!;
    expect(python).toContain(`TOKEN = "${await token.textContent()}"`);
    expect(await box.textContent()).toMatch(/ground-fault protection/);

    // The copy button puts the command on the clipboard (granted here, as a phone on https would).
    await page.context().grantPermissions(["clipboard-read", "clipboard-write"], { origin: appUrl() });
    await box.locator('[data-snippet="curl"]').getByRole("button").click();
    await expect.poll(() => box.locator('[data-snippet="curl"]').textContent()).toContain("Copied");
    const curl = (await box.locator('[data-snippet="curl"] pre').textContent())!;
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(curl);

    await box.getByRole("link", { name: "Watch for its first reading" }).click();
    await page.waitForURL(/\/probes\/\d+$/);
    const state = page.locator("[data-probe-state]");
    expect(await state.getAttribute("data-probe-state")).toBe("no-reading-yet");
    expect(await state.textContent()).toContain("Waiting for the first reading");

    const ran = await sh(curl);
    expect(ran.code).toBe(0);
    expect(JSON.parse(ran.stdout)).toMatchObject({ stored: 1 });
    // No reload: the page asks again by itself.
    await expect.poll(() => state.getAttribute("data-probe-state"), { timeout: 15_000 }).toBe("reporting");
    expect(await state.textContent()).toContain("reporting");
    await page.screenshot({ path: screenshotPath("probe-connect-live") });
    await page.context().close();
  });
});
