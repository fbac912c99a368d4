// The farm logbook on a phone: filtered by kind and by bin through its links and form (the URL keeps
// the filters across a reload), downloaded as CSV that reads back with csv-parse to the same entries,
// a formula typed as a note coming back neutralised, and a zone's readings downloaded beside it.
import fs from "node:fs";
import { parse } from "csv-parse/sync";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseSenml } from "@/lib/domain/senml";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { crewFarm, json, newBin, type Crew } from "../integration/logbook/helpers";

let browser: Browser;
let crew: Crew;
let binA: Awaited<ReturnType<typeof newBin>>;
let binB: Awaited<ReturnType<typeof newBin>>;
const NOTE = '=HYPERLINK("http://x")';
// A link's soft navigation changes the URL before the new page has streamed in; a loaded machine may take a while.
const SLOW = { timeout: 20_000 };
const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000).toISOString();

beforeAll(async () => {
  browser = await launchBrowser();
  crew = await crewFarm("Zz Logbook Export Farm");
  binA = await newBin(crew.owner, crew.farmId);
  binB = await newBin(crew.owner, crew.farmId);
  const post = async (path: string, body: unknown) => {
    const res = await crew.keeper.fetch(path, { method: "POST", json: body });
    if (res.status !== 201) throw new Error(`${path}: ${res.status} ${await res.text()}`);
  };
  await post(`/api/bins/${binA.id}/feedings`, {
    zoneId: binA.zones[0]!.id,
    at: hoursAgo(30),
    items: [
      { name: "vegetable scraps", massKg: 2, moisturePct: 87, nitrogenPct: 2.7, cn: 19 },
      { name: "shredded cardboard", massKg: 0.5, moisturePct: 8, nitrogenPct: 0.1, cn: 350 },
    ],
  });
  await post(`/api/bins/${binA.id}/waterings`, { litres: 1.5, zoneId: binA.zones[1]!.id, at: hoursAgo(20) });
  await post(`/api/bins/${binA.id}/shifts`, { zoneId: binA.zones[1]!.id, toZoneId: binA.zones[2]!.id, volumeL: 12, at: hoursAgo(10) });
  await post(`/api/bins/${binB.id}/harvests`, { massKg: 3.2, at: hoursAgo(5) });
  await post(`/api/bins/${binB.id}/notes`, { text: NOTE, at: hoursAgo(2) });
  const probe = await crew.db.query(`insert into probes (farm_id, zone_id, code, token_hash) values ($1, $2, $3, 'x') returning id`, [
    crew.farmId,
    binA.zones[0]!.id,
    `e2e-${Math.random().toString(36).slice(2, 8)}`,
  ]);
  await crew.db.query(`insert into readings (probe_id, metric, ts, value) values ($1, 'temperature', $2, 22.5), ($1, 'temperature', $3, -1.25)`, [
    probe.rows[0].id,
    hoursAgo(3),
    hoursAgo(1),
  ]);
});
afterAll(async () => {
  await browser?.close();
  await crew?.close();
});

async function downloadText(page: Page, click: () => Promise<void>) {
  const [download] = await Promise.all([page.waitForEvent("download"), click()]);
  const file = await download.path();
  return { name: download.suggestedFilename(), text: fs.readFileSync(file!, "utf8") };
}

const kindsShown = (page: Page) =>
  page
    .getByRole("list", { name: "Logbook, newest first" })
    .locator("> li")
    .evaluateAll((lis) => lis.map((li) => li.getAttribute("data-kind")));

describe("the farm logbook on a phone", () => {
  it("filters by kind and by bin, exports what it shows as CSV, and neutralises a formula", async () => {
    const context = await browser.newContext({ ...PHONE, acceptDownloads: true });
    const page = await context.newPage();
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("tomas@alder-row.example");
    await page.getByLabel("Password").fill("alder-row-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/farms\//);
    await page.goto(`${appUrl()}/farms/${crew.farmId}`);
    await page.getByRole("navigation", { name: "Farm" }).getByRole("link", { name: "Logbook" }).click();
    await page.waitForURL(/\/logbook$/);

    await expect.poll(() => kindsShown(page), SLOW).toEqual(["note", "harvest", "shift", "watering", "feeding"]);
    const feeding = page.locator('li[data-kind="feeding"]');
    expect(await feeding.getByRole("list", { name: "Items" }).locator("li").count()).toBe(2);
    expect(await feeding.textContent()).toMatch(/Mix check:/);
    expect(await page.locator('li[data-kind="shift"]').textContent()).toContain("Working zone → Curing zone");
    await page.screenshot({ path: screenshotPath("logbook-farm"), fullPage: false });
    await feeding.scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("logbook-feeding-inline"), fullPage: false });

    // By kind: one tap on a link.
    await page.getByRole("navigation", { name: "Kind" }).getByRole("link", { name: "Notes" }).click();
    await page.waitForURL(/kind=note/);
    await expect.poll(() => kindsShown(page), SLOW).toEqual(["note"]);
    expect(await page.locator('li[data-kind="note"]').textContent()).toContain(NOTE);

    // Notes of bin A: none, said in words. The bin, zone, who and date filters are folded until one is on.
    expect(await page.getByLabel("Bin").isVisible()).toBe(false);
    await page.getByText("Bin, zone, who and dates").click();
    await page.getByLabel("Bin").selectOption(binA.id);
    await page.getByRole("button", { name: "Show these entries" }).click();
    await page.waitForURL(/bin=/);
    await expect.poll(() => page.getByText("No entries match these filters.").isVisible(), SLOW).toBe(true);
    await page.screenshot({ path: screenshotPath("logbook-empty-filter"), fullPage: false });

    // Every kind in bin B; the URL keeps it across a reload.
    await page.getByRole("link", { name: "Show every entry" }).click();
    await page.waitForURL(/\/logbook$/);
    await page.getByText("Bin, zone, who and dates").click();
    await page.getByLabel("Bin").selectOption(binB.id);
    await page.getByRole("button", { name: "Show these entries" }).click();
    await page.waitForURL(new RegExp(`bin=${binB.id}`));
    await expect.poll(() => kindsShown(page), SLOW).toEqual(["note", "harvest"]);
    await page.reload();
    await expect.poll(() => kindsShown(page), SLOW).toEqual(["note", "harvest"]);
    expect(await page.getByLabel("Bin").inputValue()).toBe(binB.id);

    // The CSV holds what the list shows, and the formula comes back as text.
    const csv = await downloadText(page, () => page.getByRole("link", { name: "Download CSV" }).click());
    expect(csv.name).toBe("Zz-Logbook-Export-Farm-logbook.csv");
    const rows = parse(csv.text, { bom: true, columns: true }) as Record<string, string>[];
    const api = await json<{ entries: { id: string; kind: string }[] }>(await crew.keeper.fetch(`/api/farms/${crew.farmId}/logbook?bin=${binB.id}`));
    expect(rows.map((r) => [r["entry id"], r.kind])).toEqual(api.entries.map((e) => [e.id, e.kind]));
    expect(rows.find((r) => r.kind === "note")!.note).toBe(`'${NOTE}`);
    expect(Number(rows.find((r) => r.kind === "harvest")!["mass (kg)"])).toBeCloseTo(3.2, 3);

    // The whole logbook's CSV: every kind, the feeding with its items and verdict.
    await page.getByRole("link", { name: "Show every entry" }).click();
    await page.waitForURL(/\/logbook$/);
    const all = parse((await downloadText(page, () => page.getByRole("link", { name: "Download CSV" }).click())).text, { bom: true, columns: true }) as Record<
      string,
      string
    >[];
    expect(all.map((r) => r.kind)).toEqual(["note", "harvest", "shift", "watering", "feeding"]);
    expect(all.find((r) => r.kind === "feeding")!["items (kg each)"]).toBe("vegetable scraps 2; shredded cardboard 0.5");
    expect(errors).toEqual([]);
    await context.close();
  });

  it("downloads a zone's readings as CSV from the zone page's link, negative temperatures as numbers", async () => {
    const context = await browser.newContext({ ...PHONE, acceptDownloads: true });
    const page = await context.newPage();
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("tomas@alder-row.example");
    await page.getByLabel("Password").fill("alder-row-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/farms\//);
    // The zone page links to the form, set on that zone.
    await page.goto(`${appUrl()}/farms/${crew.farmId}/zones/${binA.zones[0]!.id}`);
    await page.getByRole("link", { name: "Download this zone's readings (CSV or SenML)" }).click();
    await page.waitForURL(/\/logbook\?place=zone/);
    const form = page.getByRole("region", { name: "Download readings" });
    await expect.poll(() => form.getByLabel("Where").inputValue(), SLOW).toBe(`zone:${binA.zones[0]!.id}`);
    await form.scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("logbook-readings-export"), fullPage: false });
    const file = await downloadText(page, () => form.getByRole("link", { name: "Download readings" }).click());
    expect(file.name).toMatch(/^Zz-Logbook-Export-Farm-readings-\d{4}-\d{2}-\d{2}-\d{4}-\d{2}-\d{2}\.csv$/);
    const rows = parse(file.text, { bom: true, columns: true }) as Record<string, string>[];
    expect(rows.map((r) => [r.metric, r.value, r.unit])).toEqual([
      ["Temperature", "22.5", "°C"],
      ["Temperature", "-1.25", "°C"],
    ]);
    // The same readings as SenML, read back with the parser the ingest uses.
    await form.getByLabel(/^SenML JSON/).check();
    const senml = await downloadText(page, () => form.getByRole("link", { name: "Download readings" }).click());
    expect(senml.name).toMatch(/\.senml\.json$/);
    const parsed = parseSenml(senml.text);
    expect(parsed.ok && parsed.records.map((r) => [r.unit, r.value])).toEqual([
      ["Cel", 22.5],
      ["Cel", -1.25],
    ]);
    await context.close();
  });
});
