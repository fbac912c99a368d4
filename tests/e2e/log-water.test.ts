// A keeper at phone size logs water on a bin page and finds it at the top of the logbook, with its
// kind word; a negative amount is refused beside the field.
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, signIn } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { crewFarm, newBin, type Crew } from "../integration/logbook/helpers";

let browser: Browser;
let crew: Crew;
let bin: Awaited<ReturnType<typeof newBin>>;

beforeAll(async () => {
  browser = await launchBrowser();
  // A farm of its own so the demo farm's logbook stays as seeded.
  crew = await crewFarm("Zz Log Water Farm");
  bin = await newBin(crew.owner, crew.farmId);
  await signIn("tomas@alder-row.example", "alder-row-demo");
});
afterAll(async () => {
  await browser?.close();
  await crew?.close();
});

describe("logging water on the bin page", () => {
  it("a keeper logs water and sees it in the logbook", async () => {
    const page = await (await browser.newContext(PHONE)).newPage();
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    page.on("console", (m) => {
      if (m.type() === "error" && !m.text().includes("status of 422")) errors.push(m.text());
    });
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("tomas@alder-row.example");
    await page.getByLabel("Password").fill("alder-row-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/farms\//);
    // The water form opens from the bin page's Log button; its kind is in the address.
    await page.goto(`${appUrl()}/farms/${crew.farmId}/bins/${bin.id}?log=water`);

    const form = page.locator("form", { has: page.getByRole("heading", { name: "Log water" }) });
    await form.getByLabel(/^Water \(L\)/).fill("-2");
    await form.getByRole("button", { name: "Log water" }).click();
    await expect.poll(() => form.getByText("Give an amount above 0 L.").isVisible()).toBe(true);
    expect(await form.getByLabel(/^Water \(L\)/).getAttribute("aria-invalid")).toBe("true");

    await form.getByLabel("Where").selectOption({ label: "Working zone" });
    await form.getByLabel(/^Water \(L\)/).fill("1,5");
    await form.getByLabel("Notes (optional)").fill("bed felt dry");
    await form.scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("log-water-form"), fullPage: false });
    await form.getByRole("button", { name: "Log water" }).click();
    // Once logged the form closes and the Log panel says what was logged.
    await expect.poll(() => page.getByRole("region", { name: "Log work" }).getByRole("status").textContent()).toContain("Water logged.");
    await expect.poll(() => form.count()).toBe(0);

    const log = page.getByRole("list", { name: "Logbook, newest first" });
    const first = log.locator("li").first();
    await expect.poll(() => first.getAttribute("data-kind")).toBe("watering");
    const text = (await first.textContent()) ?? "";
    expect(text).toContain("Water");
    expect(text).toContain("1.5 L");
    expect(text).toContain("Working zone");
    expect(text).toContain("bed felt dry");
    await expect.poll(() => first.getByRole("button", { name: /Undo/ }).isVisible()).toBe(true);

    const stored = await crew.db.query(`select litres, zone_id from waterings where bin_id = $1`, [bin.id]);
    expect(stored.rows).toHaveLength(1);
    expect(stored.rows[0].litres).toBeCloseTo(1.5, 5);
    expect(stored.rows[0].zone_id).toBe(bin.zones.find((z) => z.kind === "working")!.id);

    await first.scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("log-water-logbook"), fullPage: false });

    // Undo takes it away again.
    await first.getByRole("button", { name: /Undo/ }).click();
    await expect.poll(async () => (await crew.db.query(`select count(*)::int as n from waterings where bin_id = $1`, [bin.id])).rows[0].n).toBe(0);
    expect(errors).toEqual([]);
  });
});
