// Issue 13, at phone size: an owner adds a small bin with its size, then plans a 15 kg feeding on it.
// The feeding form names the load as heavy for the bin (per m² of its floor, against the heat rule's
// own line) before anything is logged; a mix of fruit waste and mixed paper is checked (the library
// gives both all three values); peat moss and coconut coir are not offered.
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { feedingLoadWords, loadForBin } from "@/lib/domain/feeding-load";
import { checkMix, type MixItem } from "@/lib/domain/mix";
import { ingredients } from "@/lib/domain/ingredients";
import { formatNumber } from "@/lib/domain/units";
import { appUrl, signIn, type Session } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

let browser: Browser;
let owner: Session;
let farmId: string;
const made: string[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
  owner = await signIn("noor@alder-row.example", "alder-row-demo");
  const farms = (await (await owner.fetch("/api/farms")).json()) as { farms: { id: string; name: string }[] };
  farmId = farms.farms.find((f) => f.name === "Alder Row Worm Farm")!.id;
});
afterAll(async () => {
  // the bins this test made are archived (their feedings stay, as for any archived bin)
  for (const id of made) await owner.fetch(`/api/bins/${id}`, { method: "DELETE" });
  await browser?.close();
});

async function signedIn(email: string): Promise<{ page: Page; errors: string[] }> {
  const page = await (await browser.newContext(PHONE)).newPage();
  const errors: string[] = [];
  page.on("pageerror", (e) => errors.push(e.message));
  page.on("console", (m) => {
    if (m.type() === "error" && !m.text().includes("status of 422")) errors.push(m.text());
  });
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("alder-row-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/farms\//);
  return { page, errors };
}

const lib = (key: string, massKg: number): MixItem => {
  const i = ingredients.find((x) => x.key === key)!;
  return { name: i.name, massKg, moisturePct: i.moisturePct!, carbonPct: i.carbonPct!, nitrogenPct: i.nitrogenPct! };
};

describe("a feeding weighed against the bin", () => {
  it("an owner adds an 80 × 50 cm bin and sees 15 kg named heavy before logging it", async () => {
    const { page, errors } = await signedIn("noor@alder-row.example");
    const name = `Porch tote ${Date.now().toString(36)}`;

    await page.goto(`${appUrl()}/farms/${farmId}/bins/new`);
    const add = page.locator("form").filter({ has: page.getByRole("heading", { name: "Add a bin" }) });
    await add.getByLabel("Name").fill(name);
    await add.getByLabel("Zones (feeding side to harvest side)").selectOption("1");
    // a bad size is refused beside its field, in words, and nothing typed is lost
    await add.getByLabel("Length (cm)").fill("0.5");
    await add.getByLabel("Width (cm)").fill("50");
    await add.getByRole("button", { name: "Add", exact: true }).click();
    await expect.poll(() => add.getByLabel("Length (cm)").getAttribute("aria-invalid")).toBe("true");
    expect(await add.textContent()).toContain("Length is too small to be measured; the smallest is 1 cm.");
    expect(await add.getByLabel("Name").inputValue()).toBe(name);
    await add.getByLabel("Length (cm)").fill("80");
    await add.getByLabel("Depth (cm)").fill("30");
    await expect.poll(() => add.textContent()).toContain("Floor: 0.40 m².");
    await page.screenshot({ path: screenshotPath("add-bin-with-size"), fullPage: true });
    await add.getByRole("button", { name: "Add", exact: true }).click();
    await page.waitForURL(new RegExp(`/farms/${farmId}$`));

    const bins = (await (await owner.fetch(`/api/farms/${farmId}/bins`)).json()) as {
      bins: { id: string; name: string; lengthCm: number; widthCm: number; depthCm: number }[];
    };
    const bin = bins.bins.find((b) => b.name === name)!;
    made.push(bin.id);
    expect(bin).toMatchObject({ lengthCm: 80, widthCm: 50, depthCm: 30 });

    await page.goto(`${appUrl()}/farms/${farmId}/bins/${bin.id}?log=feeding`);
    const form = page.locator("form#log");
    // the library offers fruit waste and mixed paper, not peat moss or coconut coir
    const offered = form.getByRole("list", { name: "Library ingredients" });
    await offered.getByRole("button", { name: /Fruit waste/ }).waitFor();
    expect(await offered.getByRole("button", { name: /Peat moss|Coconut coir/ }).count()).toBe(0);
    expect(await form.textContent()).toContain("Not in the library: Peat moss, Coconut coir.");

    await offered.getByRole("button", { name: /Fruit waste/ }).click();
    await form.getByLabel("Mass (kg)").first().fill("13");
    await form.getByLabel("Find an ingredient").fill("paper");
    await form.getByRole("button", { name: /Mixed paper/ }).click();
    await form.getByLabel("Mass (kg)").nth(1).fill("2");

    // the mix check runs for the library: the same numbers as lib/domain/mix.ts
    const mix = checkMix([lib("fruit-waste", 13), lib("mixed-paper", 2)]);
    if (!mix.ok) throw new Error(mix.error.message);
    await expect.poll(() => form.locator("#mix-moisture").textContent()).toBe(formatNumber(mix.value.moisturePct, 1));
    expect(await form.locator("#mix-cn").textContent()).toBe(formatNumber(mix.value.cn!, 1));

    // 15 kg on 0.4 m² is 37.5 kg/m²: heavy, said in words before anything is logged
    const expected = feedingLoadWords(loadForBin(15, { areaM2: 0.4, intervalDays: null }, { zoneCount: 1, toOneZone: true })!, "metric");
    expect(expected.lines[0]).toMatch(/^15 kg on 0\.4 m² is 38 kg\/m², heavy for this bin: a load this size can heat the bed\. Spread it over \d+ feedings/);
    const load = form.locator("#feeding-load");
    await expect.poll(() => load.textContent()).toContain(expected.lines[0]);
    // not by colour alone: the heat mark and the words say it
    expect(await load.locator("svg[data-mark=heat]").count()).toBe(1);
    expect(await load.textContent()).toContain("air a closed room");
    const logged = (await (await owner.fetch(`/api/bins/${bin.id}/feedings`)).json()) as { feedings: unknown[] };
    expect(logged.feedings).toHaveLength(0);
    await page.locator("#mix-h").scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("feeding-heavy-load") });

    // a lighter feeding is under the line
    await form.getByLabel("Mass (kg)").first().fill("1");
    await form.getByLabel("Mass (kg)").nth(1).fill("0.5");
    await expect.poll(() => load.textContent()).toContain("1.5 kg on 0.4 m² is 3.8 kg/m², under the heat rule's heavy line of 4 kg/m².");

    await form.getByRole("button", { name: "Log this feeding" }).click();
    await expect.poll(() => form.getByRole("status").textContent()).toContain("Logged 1.50 kg");
    expect(errors).toEqual([]);
  });

  it("an item with a value missing is asked for, and the rest of the mix is still checked", async () => {
    const { page, errors } = await signedIn("tomas@alder-row.example");
    const bins = (await (await owner.fetch(`/api/farms/${farmId}/bins`)).json()) as { bins: { id: string; lengthCm: number | null }[] };
    const bin = bins.bins.find((b) => b.lengthCm != null)!;
    await page.goto(`${appUrl()}/farms/${farmId}/bins/${bin.id}?log=feeding`);
    const form = page.locator("form#log");
    await form
      .getByRole("list", { name: "Library ingredients" })
      .getByRole("button", { name: /Fruit waste/ })
      .click();
    await form.getByLabel("Mass (kg)").first().fill("2");
    await form.getByRole("button", { name: "Add an item by hand" }).click();
    await form.getByLabel("Name").fill("Our coir");
    await form.getByLabel("Mass (kg)").nth(1).fill("0.5");
    await form.getByLabel("Moisture (%)").nth(1).fill("60");
    const check = checkMix([lib("fruit-waste", 2)]);
    if (!check.ok) throw new Error(check.error.message);
    await expect.poll(() => form.locator("#mix-cn").textContent()).toBe(formatNumber(check.value.cn!, 1));
    expect(await form.locator("#mix-waiting").textContent()).toContain("Not counted yet: Our coir: give its nitrogen (% of dry mass)");
    await page.locator("#mix-h").scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("feeding-value-asked") });
    expect(errors).toEqual([]);
  });
});
