// From nothing to a first reading, alone, on a phone (390×844): a brand-new person signs up, opens the
// link from the fake mailbox, starts a farm, adds a bin with three zones from the setup checklist,
// registers a probe, runs the mosquitto_pub command exactly as the page shows it, and sees the
// reading on the probe's page and on Today. The elapsed time is printed.
import { execFile } from "node:child_process";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import type pg from "pg";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { appDb, linkIn, uniq, waitForMail } from "../integration/team/fixtures";

// The broker writes to the app's database, as the ingest service of `npm start` does.
process.env.DATABASE_URL = inject("appDbUrl");
const { startIngest } = await import("@/ingest/service");

const SLOW = { timeout: 20_000 };
let browser: Browser;
let c: pg.Client;
let ingest: Awaited<ReturnType<typeof startIngest>>;

function sh(line: string): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile("/bin/sh", ["-c", line], { timeout: 20_000 }, (err, stdout, stderr) => resolve({ code: err ? 1 : 0, stdout, stderr }));
  });
}

beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
  // Where the app's snippets tell probes to publish (PUBLIC_MQTT_URL of the test app).
  ingest = await startIngest({ port: inject("probeBrokerPort"), batch: { maxWaitMs: 10 } });
});
afterAll(async () => {
  await browser?.close();
  await ingest?.close();
  await c?.end();
});

describe("from nothing to a first reading", () => {
  it("signs up, starts a farm, adds a bin, registers a probe, runs the command shown, and sees the reading", async () => {
    const started = Date.now();
    const email = `first-reading-${uniq()}@example.org`;
    const password = "castings-and-coffee-grounds";
    const page = await (await browser.newContext(PHONE)).newPage();

    // Sign up and confirm the address from the mail.
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByRole("link", { name: "Make an account" }).click();
    await page.getByLabel("Your name").fill("Oona Newcomer");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill(password);
    await page.getByRole("button", { name: "Make my account" }).click();
    await page.waitForURL("**/check-mail", SLOW);
    await page.goto(`${appUrl()}${linkIn((await waitForMail(email))[0]!, "/verify/")}`);
    await page.getByRole("button", { name: "Confirm my address" }).click();
    await page.waitForURL("**/sign-in?notice=verified", SLOW);
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();

    // Start a farm.
    await page.getByLabel("Farm name").fill(`Kitchen Step ${uniq()}`);
    await page.getByRole("button", { name: "Start the farm" }).click();
    await page.waitForURL(/\/farms\/[0-9a-f-]{36}$/, SLOW);
    const farmId = new URL(page.url()).pathname.split("/").pop()!;

    // Add a bin with three zones from the checklist.
    const list = page.getByRole("region", { name: "Setting up this farm" });
    await list.getByRole("link", { name: "Add a bin" }).click();
    await page.waitForURL(/\/bins\/new$/);
    await page.getByLabel("Name").fill("Step tray");
    await page.getByLabel("Zones (feeding side to harvest side)").selectOption("3");
    await page.getByRole("button", { name: "Add", exact: true }).click();
    await page.waitForURL(new RegExp(`/farms/${farmId}$`), SLOW);
    const bin = page.getByRole("region", { name: "Step tray", exact: true });
    await expect.poll(() => bin.getByRole("heading", { level: 3 }).allTextContents(), SLOW).toEqual(["Fresh zone", "Working zone", "Curing zone"]);

    // Register a probe in the working zone.
    await page.goto(`${appUrl()}/farms/${farmId}/probes`);
    const code = `step-${Date.now().toString(36)}`;
    await page.getByLabel("Probe code").fill(code);
    const zoneSelect = page.locator("select[name=zoneId]");
    const working = await zoneSelect.locator("option", { hasText: "Working" }).first().getAttribute("value");
    await zoneSelect.selectOption(working!);
    await page.getByRole("button", { name: "Register" }).click();
    const box = page.locator(`[data-connect-probe="${code}"]`);
    await box.waitFor(SLOW);

    // The mosquitto_pub command exactly as the page shows it, run as the keeper would paste it.
    const command = (await box.locator('[data-snippet="mosquitto-pub"] pre').textContent())!;
    expect(command).toContain(`-p ${inject("probeBrokerPort")}`);
    const ran = await sh(command);
    expect(ran, ran.stderr).toMatchObject({ code: 0 });
    const sent = /"v":\s*([-\d.]+)/.exec(command);
    expect(sent).not.toBeNull();

    // The probe's page turns live without a reload.
    await box.getByRole("link", { name: "Watch for its first reading" }).click();
    await page.waitForURL(/\/probes\/\d+$/);
    await expect.poll(() => page.locator("[data-probe-state]").getAttribute("data-probe-state"), SLOW).toBe("reporting");
    await page.screenshot({ path: screenshotPath("first-reading-probe") });

    // Today shows the reading in the working zone, and the checklist has ticked the first three steps.
    await page.goto(`${appUrl()}/farms/${farmId}`);
    const workingRow = page
      .getByRole("region", { name: "Step tray", exact: true })
      .getByRole("listitem")
      .filter({ has: page.getByRole("heading", { name: "Working zone" }) });
    await expect.poll(() => workingRow.textContent(), SLOW).toContain(`${Number(sent![1]).toFixed(1)} °C`);
    const done = await page
      .locator("[data-step]")
      .evaluateAll((els) => els.filter((e) => e.getAttribute("data-done") === "true").map((e) => e.getAttribute("data-step")));
    expect(done).toEqual(expect.arrayContaining(["bin", "probe", "reading"]));
    await page.screenshot({ path: screenshotPath("first-reading-today"), fullPage: true });
    console.log(`from nothing to a first reading on Today: ${((Date.now() - started) / 1000).toFixed(1)} s`);
    await page.context().close();
  });
});
