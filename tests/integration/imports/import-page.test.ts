// The import page in Debian's Chromium on a phone-sized screen: pick a file, map its columns,
// read the bad rows by line; a keeper sees no form.
import pg from "pg";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { appUrl } from "../../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../../helpers/browser";
import { addMember, makeFarm, type TestFarm } from "../series/fixtures";

const PASSWORD = "import-page-pass";
// A loaded machine can take seconds to answer an upload; the poll's default is 1 s.
const SLOW = { timeout: 20_000 };
let browser: Browser;
let c: pg.Client;
let farm: TestFarm;
let ownerEmail: string;
let keeperEmail: string;

async function signedIn(email: string): Promise<Page> {
  const page = await (await browser.newContext(PHONE)).newPage();
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/farms\//);
  await page.goto(`${appUrl()}/farms/${farm.farmId}/imports`);
  return page;
}

beforeAll(async () => {
  browser = await launchBrowser();
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  farm = await makeFarm(c, { zones: ["working"] });
  ownerEmail = await addMember(c, farm.farmId, "owner", PASSWORD);
  keeperEmail = await addMember(c, farm.farmId, "keeper", PASSWORD);
});

afterAll(async () => {
  await browser?.close();
  await c?.end();
});

describe("the import page", () => {
  it("an owner picks a CSV, maps its columns, and sees what was stored and each bad row by line", async () => {
    const page = await signedIn(ownerEmail);
    const code = farm.probes[0]!.code;
    const csv = `When,Reading\n2025-04-01 06:00,18.5\n2025-04-01 06:10,eighteen\n2025-04-01 06:20,18.9\n`;
    await page.getByLabel("Logger file (CSV)").setInputFiles({ name: "shed-logger.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
    // The header is read in the browser and common names are guessed.
    await expect.poll(() => page.getByLabel("Time", { exact: true }).inputValue(), SLOW).toBe("When");
    expect(await page.getByLabel("Value", { exact: true }).inputValue()).toBe("Reading");
    expect(await page.getByRole("table").getByText("eighteen").count()).toBe(1);
    await page.getByLabel("Probe", { exact: true }).selectOption({ label: "One probe for the whole file" });
    await page.getByLabel("Which probe?").selectOption(code);
    await page.getByLabel("Measures", { exact: true }).selectOption({ label: "The same for the whole file" });
    await page.getByLabel("Measures, for the whole file").selectOption("temperature");
    await page.getByRole("button", { name: "Import readings" }).click();
    await expect.poll(() => page.getByText("2 readings stored").count(), SLOW).toBe(1);
    expect(await page.getByText("1 row refused").count()).toBe(1);
    expect(await page.getByText(/Line 3:.*"eighteen" is not a number/).count()).toBeGreaterThan(0);
    // Every tap target of the form is at least 44 px high (WCAG 2.2 SC 2.5.5 target size, enhanced).
    for (const el of await page.locator("form select, form button[type=submit]").all()) {
      expect((await el.boundingBox())!.height).toBeGreaterThanOrEqual(44);
    }
    await page.screenshot({ path: screenshotPath("import-owner"), fullPage: true });

    await page.getByRole("button", { name: "Import readings" }).click();
    await expect.poll(() => page.getByText("Already imported.").count(), SLOW).toBe(1);
    const n = await c.query(`select count(*)::int as n from readings where probe_id = $1`, [farm.probes[0]!.id]);
    expect(n.rows[0].n).toBe(2);
    await page.context().close();
  });

  it("a refused choice is shown beside its field, and a bad row names its column", async () => {
    const page = await signedIn(ownerEmail);
    await page
      .getByLabel("Logger file (CSV)")
      .setInputFiles({ name: "odd.csv", mimeType: "text/csv", buffer: Buffer.from("time,probe,value\n2025-04-01T06:00:00Z,x,1\n") });
    await expect.poll(() => page.getByLabel("Time", { exact: true }).inputValue(), SLOW).toBe("time");
    await page.getByLabel("Measures", { exact: true }).selectOption({ label: "The same for the whole file" });
    const tz = page.getByLabel("Time zone of times without one");
    await tz.fill("Mars/Olympus");
    await page.getByRole("button", { name: "Import readings" }).click();
    await expect.poll(() => tz.getAttribute("aria-invalid"), SLOW).toBe("true");
    const describedBy = (await tz.getAttribute("aria-describedby"))!;
    expect(await page.locator(`[id="${describedBy}"]`).textContent()).toMatch(/Unknown time zone; use a name such as Europe\/Dublin/);

    await tz.fill("Europe/Dublin");
    await page.getByRole("button", { name: "Import readings" }).click();
    await expect.poll(() => page.getByText("1 row refused").count(), SLOW).toBe(1);
    expect(await page.getByText(/Line 2: probe \(column "probe"\): no probe "x" on this farm/).count()).toBeGreaterThan(0);
    await page.context().close();
  });

  it("a keeper sees the history but no upload form", async () => {
    const page = await signedIn(keeperEmail);
    await expect.poll(() => page.getByRole("heading", { name: "Import logger files" }).count(), SLOW).toBe(1);
    expect(await page.getByText("Only an owner").count()).toBe(1);
    expect(await page.getByLabel("Logger file (CSV)").count()).toBe(0);
    expect(await page.getByText("shed-logger.csv").count()).toBe(1);
    await page.context().close();
  });
});
