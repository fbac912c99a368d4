// An owner at phone size changes the heat heads-up line of a bin whose last 30 days cross 23 °C five
// times and 25 °C twice, and sees the preview's count change before saving; the stored rule stays as
// it was until Save.
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { crewFarm, newBin, type Crew } from "../integration/logbook/helpers";
import { heatHistory, probeWithReadings, SPELLS } from "../integration/rules-preview/fixtures";

let browser: Browser;
let crew: Crew;
let bin: Awaited<ReturnType<typeof newBin>>;

beforeAll(async () => {
  browser = await launchBrowser();
  crew = await crewFarm("Zz Rule Preview Browser Farm");
  bin = await newBin(crew.owner, crew.farmId, 1);
  await probeWithReadings(crew.db, crew.farmId, bin.zones[0]!.id, heatHistory(Date.now(), SPELLS));
});
afterAll(async () => {
  await browser?.close();
  await crew?.close();
});

const storedHeatRules = async () => (await crew.db.query(`select thresholds from rules where bin_id = $1 and kind = 'heat'`, [bin.id])).rows;

describe("the rule preview", () => {
  it("an owner sees the heat count change before saving, and nothing is stored until Save", async () => {
    const page = await (await browser.newContext(PHONE)).newPage();
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    page.on("console", (m) => {
      if (m.type() === "error") errors.push(m.text());
    });
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("noor@alder-row.example");
    await page.getByLabel("Password").fill("alder-row-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/farms\//);
    await page.goto(`${appUrl()}/farms/${crew.farmId}/bins/${bin.id}/rules`);

    const card = page.locator("section#rule-heat");
    const line = card.getByLabel("Heads-up above", { exact: true });
    const counts = card.getByTestId("preview-counts");
    // A first change: 24.5 °C, still above the three spells at 24 °C (fixtures.ts).
    await line.fill("24.5");
    await expect.poll(() => counts.textContent(), { timeout: 30_000 }).toMatch(/now: \d+ heads-up, \d+ act now → with your change: \d+ heads-up/);
    const first = (await counts.textContent())!;
    const proposedOf = (text: string) => Number(/with your change: (\d+) heads-up/.exec(text)![1]);
    const nowOf = (text: string) => Number(/now: (\d+) heads-up/.exec(text)![1]);
    expect(proposedOf(first)).toBe(nowOf(first));

    // Then 23 °C: the three spells at 24 °C now cross it, so the count rises, before any Save.
    await line.fill("23");
    await expect
      .poll(async () => proposedOf((await counts.textContent()) ?? "with your change: 0 heads-up"), { timeout: 30_000 })
      .toBeGreaterThan(proposedOf(first));
    const second = (await counts.textContent())!;
    expect(nowOf(second)).toBe(nowOf(first));
    expect(await storedHeatRules()).toEqual([]);

    await card.getByTestId("preview-heat").scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("rule-preview"), fullPage: false });

    await card.getByRole("button", { name: "Save heat rule" }).click();
    await expect.poll(storedHeatRules).toEqual([{ thresholds: { headsUpAboveC: 23 } }]);
    expect(errors).toEqual([]);
  });
});
