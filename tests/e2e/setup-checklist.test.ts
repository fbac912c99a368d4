// A new farm's Today on a phone (390×844): the setup checklist, adding a bin from it (errors under
// their fields, zones shown in order), the first reading ticking its step without the sparkline's
// "no readings" words under a live value, and what a keeper sees.
import { randomBytes } from "node:crypto";
import type { Browser, Page } from "playwright-core";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { addToFarm, appDb, makeFarm, makePerson, type Person } from "../integration/team/fixtures";

let browser: Browser;
let c: pg.Client;
beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
});
afterAll(async () => {
  await browser?.close();
  await c?.end();
});

async function signedIn(p: Person): Promise<Page> {
  const page = await (await browser.newContext(PHONE)).newPage();
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(p.email);
  await page.getByLabel("Password").fill(p.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/farms\//);
  return page;
}

const steps = (page: Page) => page.locator("[data-step]");
const stepDone = (page: Page, step: string) => page.locator(`[data-step=${step}]`).getAttribute("data-done");

describe("a new farm's Today on a phone", () => {
  it("shows the setup checklist; the owner adds a bin from it and the steps tick from the data", async () => {
    const owner = await makePerson(c, "New owner");
    const farmId = await makeFarm(c, `Porch farm ${randomBytes(3).toString("hex")}`);
    await addToFarm(c, farmId, owner.id, "owner");
    const page = await signedIn(owner);
    await page.goto(`${appUrl()}/farms/${farmId}`);

    const list = page.getByRole("region", { name: "Setting up this farm" });
    await expect.poll(() => list.count()).toBe(1);
    expect(await steps(page).evaluateAll((els) => els.map((e) => e.getAttribute("data-step")))).toEqual(["bin", "probe", "reading", "alerts", "crew"]);
    expect(await steps(page).evaluateAll((els) => els.map((e) => e.getAttribute("data-done")))).toEqual(["false", "false", "false", "false", "false"]);
    expect(await list.textContent()).toContain("0 of 5 done");
    // The checklist is the first thing under the title, in view without scrolling.
    const box = await list.boundingBox();
    expect(box!.y).toBeLessThan(844);
    await page.screenshot({ path: screenshotPath("setup-checklist-new-farm") });

    await list.getByRole("link", { name: "Add a bin" }).click();
    await page.waitForURL(/\/bins\/new$/);
    // Sent empty: the refusal stands under the name, in words, and the thumb is taken there.
    await page.getByRole("button", { name: "Add", exact: true }).click();
    const name = page.getByLabel("Name");
    await expect.poll(() => name.getAttribute("aria-invalid")).toBe("true");
    expect(await page.locator(`#${await name.getAttribute("aria-describedby")}`.replace(/:/g, "\\:")).textContent()).toBe("Give it a name.");
    expect(await name.evaluate((el) => el === document.activeElement)).toBe(true);
    await page.screenshot({ path: screenshotPath("setup-add-bin-error"), fullPage: true });

    // Style, species, and the zones shown in order before anything is sent.
    await name.fill("Porch flow-through");
    await page.getByLabel("Style").selectOption("flow-through");
    await page.getByLabel("Species").selectOption("eisenia-hortensis");
    await page.getByLabel("Zones (feeding side to harvest side)").selectOption("4");
    const order = page.getByRole("list", { name: "Zones in order" }).getByRole("listitem");
    expect(await order.allTextContents()).toEqual(["1Fresh zonefeeding side", "2Working zone", "3Working zone", "4Curing zoneharvest side"]);
    await page.screenshot({ path: screenshotPath("setup-add-bin-filled"), fullPage: true });
    await page.getByRole("button", { name: "Add", exact: true }).click();

    // Back on Today: the bin with its four zones, and its step ticked with the done mark and word.
    await page.waitForURL(new RegExp(`/farms/${farmId}$`));
    const bin = page.getByRole("region", { name: "Porch flow-through", exact: true });
    await expect.poll(() => bin.count()).toBe(1);
    expect(await bin.textContent()).toContain("flow-through");
    expect(await bin.getByRole("heading", { level: 3 }).allTextContents()).toEqual(["Fresh zone", "Working zone", "Working zone", "Curing zone"]);
    await expect.poll(() => stepDone(page, "bin")).toBe("true");
    expect(await page.locator("[data-step=bin]").textContent()).toContain("done");
    expect(await page.locator("[data-step=bin] [data-mark=done]").count()).toBe(1);
    expect(await stepDone(page, "probe")).toBe("false");
    expect(await list.textContent()).toContain("1 of 5 done");

    // A probe in the fresh zone and its first reading: both steps tick, and the zone shows the value
    // with no "No readings in the last 24 h" under it.
    const zone = await c.query(`select z.id from zones z join bins b on b.id = z.bin_id where b.farm_id = $1 and z.position = 1`, [farmId]);
    const probe = await c.query(`insert into probes (farm_id, zone_id, code, token_hash, metrics) values ($1, $2, $3, 'x', '{temperature}') returning id`, [
      farmId,
      zone.rows[0].id,
      `porch-${randomBytes(3).toString("hex")}`,
    ]);
    await c.query(`insert into readings (probe_id, metric, ts, value) values ($1, 'temperature', now() - interval '1 minute', 23.4)`, [probe.rows[0].id]);
    // A moisture-only probe in the curing zone: its zone says when it last heard, not "no readings yet".
    const curing = await c.query(`select z.id from zones z join bins b on b.id = z.bin_id where b.farm_id = $1 and z.position = 4`, [farmId]);
    const wet = await c.query(`insert into probes (farm_id, zone_id, code, token_hash, metrics) values ($1, $2, $3, 'x', '{moisture}') returning id`, [
      farmId,
      curing.rows[0].id,
      `porch-${randomBytes(3).toString("hex")}`,
    ]);
    await c.query(`insert into readings (probe_id, metric, ts, value) values ($1, 'moisture', now() - interval '2 minutes', 74)`, [wet.rows[0].id]);
    // No reload: Today's own refresh (here on focus, as when the phone is picked up) sees the reading,
    // and the checklist is drawn again with the step ticked.
    await expect
      .poll(
        async () => {
          await page.evaluate(() => window.dispatchEvent(new Event("focus")));
          return stepDone(page, "reading");
        },
        { timeout: 20_000, interval: 1000 },
      )
      .toBe("true");
    expect(await stepDone(page, "probe")).toBe("true");
    expect(await page.locator("[data-step=reading] a").getAttribute("href")).toBe(`/farms/${farmId}/probes/${wet.rows[0].id}`); // the newest probe
    const fresh = bin.getByRole("listitem").filter({ has: page.getByRole("heading", { name: "Fresh zone" }) });
    expect(await fresh.textContent()).toContain("23.4");
    // Two working zones with no reading, fresh moisture and curing temperature.
    expect(await page.getByText("No readings in the last 24 h").count()).toBe(2 * 2 + 2);
    const curingRow = bin.getByRole("listitem").filter({ has: page.getByRole("heading", { name: "Curing zone" }) });
    expect(await curingRow.textContent()).toContain("74");
    expect(await curingRow.textContent()).toContain("2 min ago");
    expect(await curingRow.textContent()).not.toContain("no readings yet");
    expect(await fresh.getByText("No readings in the last 24 h").count()).toBe(1); // moisture only: the probe measures temperature
    expect(await fresh.getByText("First reading in; the line starts with the next.").count()).toBe(1);
    await page.screenshot({ path: screenshotPath("setup-first-reading"), fullPage: true });
    await page.context().close();
  });

  it("a keeper sees only alerts on this phone and a note that the owner is setting up; a viewer only the note", async () => {
    const owner = await makePerson(c, "Owner two");
    const keeper = await makePerson(c, "Keeper two");
    const farmId = await makeFarm(c);
    await addToFarm(c, farmId, owner.id, "owner");
    await addToFarm(c, farmId, keeper.id, "keeper");
    const page = await signedIn(keeper);
    await page.goto(`${appUrl()}/farms/${farmId}`);
    const list = page.getByRole("region", { name: "Setting up this farm" });
    await expect.poll(() => list.count()).toBe(1);
    expect(await steps(page).evaluateAll((els) => els.map((e) => e.getAttribute("data-step")))).toEqual(["alerts"]);
    expect(await list.getByRole("link", { name: "Turn on alerts on this phone" }).getAttribute("href")).toBe("/me");
    expect(await list.textContent()).toContain("still setting it up");
    expect(await list.getByRole("link", { name: "Add a bin" }).count()).toBe(0);
    await page.screenshot({ path: screenshotPath("setup-checklist-keeper") });
    // The add-bin page is the owner's: a keeper gets the not-found page (streamed after a 200 below
    // the farm's loading boundary, so marked noindex: Next.js docs, "loading.js", status codes).
    await page.goto(`${appUrl()}/farms/${farmId}/bins/new`);
    await expect.poll(() => page.locator('meta[name="robots"][content="noindex"]').count()).toBeGreaterThan(0);
    expect(await page.getByLabel("Name").count()).toBe(0);
    await page.context().close();

    // A viewer gets no alerts (only owners and keepers do), so only the note.
    const viewer = await makePerson(c, "Viewer two");
    await addToFarm(c, farmId, viewer.id, "viewer");
    const v = await signedIn(viewer);
    await v.goto(`${appUrl()}/farms/${farmId}`);
    const vl = v.getByRole("region", { name: "Setting up this farm" });
    await expect.poll(() => vl.count()).toBe(1);
    expect(await steps(v).count()).toBe(0);
    expect(await vl.getByRole("link").count()).toBe(0);
    expect(await vl.textContent()).toContain("still setting it up");
    await v.context().close();
  });
});
