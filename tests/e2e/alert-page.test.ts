// An alert leads to the data, at phone size: the push the app queued for an alert opens the alert's
// own page, where a keeper claims it and settles it with a note, then finds it in the history under
// "settled" with the note on its page; a zone with an open alert says so before its values; the
// history filters by kind and bin and opens one alert with its chart and events.
// The farm is this file's own, in the app's database, so the demo farm other tests read is untouched.
import fs from "node:fs";
import { createRequire } from "node:module";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

// The app's own database, not the worker's: the browser must see what this file makes.
process.env.DATABASE_URL = inject("appDbUrl");
process.env.APP_URL = appUrl();
// Mail on too, so the outbox row carries the e-mail a person gets when their pushes fail.
process.env.SMTP_PORT = String(inject("smtpPort"));
const { db } = await import("@/db");
const { getAlertRow, listAlerts, raiseAlert } = await import("@/db/queries/alerts");
const { insertReadings } = await import("@/db/queries/readings");
const { insertFeeding } = await import("@/db/queries/feedings");
const { savePushSubscription } = await import("@/db/queries/push");
const { bins, farms, memberships, probes, users, zones } = await import("@/db/schema");
const { notifyAlert } = await import("@/lib/server/alerts/notify");
const { makeVapidKeys } = await import("@/lib/server/push/push");
const { hashPassword } = await import("@/lib/server/auth/password");
const { newSubscriber } = await import("../helpers/push");
const { sql } = await import("drizzle-orm");

// The outbox row needs push set up in this process too; the keys only sign, and nothing is sent here.
const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;

const PASSWORD = "alert-page-e2e-pass";
const HOUR = 3_600_000;
// A page refresh after a change renders on the server again: on a busy two-core machine, seconds.
const SLOW = { timeout: 15_000 };
let browser: Browser;
let farmId: string;
let keeperEmail: string;
const bed = {} as { binId: string; fresh: string; working: string };
const shed = {} as { binId: string; zone: string };
const ids = {} as { heat: string; hot: string; drying: string };

async function place(name: string, kinds: ("fresh" | "working")[]) {
  const [bin] = await db().insert(bins).values({ farmId, name, style: "bed", species: "eisenia-fetida" }).returning();
  const made = await db()
    .insert(zones)
    .values(kinds.map((kind, i) => ({ binId: bin!.id, position: i + 1, kind })))
    .returning();
  return { binId: bin!.id, zones: made.map((z) => z.id) };
}

async function probeWith(zoneId: string, code: string, series: (hoursAgo: number) => { temperature: number; moisture: number }) {
  const [p] = await db()
    .insert(probes)
    .values({ farmId, zoneId, code, tokenHash: "x", metrics: ["temperature", "moisture"] })
    .returning();
  const now = Math.floor(Date.now() / 60_000) * 60_000;
  const rows = [];
  // Every 5 minutes over the last 8 hours.
  for (let m = 8 * 60; m >= 0; m -= 5) {
    const v = series(m / 60);
    rows.push({ probeId: p!.id, metric: "temperature" as const, ts: new Date(now - m * 60_000), value: v.temperature });
    rows.push({ probeId: p!.id, metric: "moisture" as const, ts: new Date(now - m * 60_000), value: v.moisture });
  }
  await insertReadings(rows);
}

const alertOf = (zoneId: string, binId: string, kind: "heat" | "drying", level: "heads_up" | "act_now", value: number, message: string, hoursAgo: number) =>
  raiseAlert(
    { farmId, binId, zoneId, probeId: null, subject: `zone:${zoneId}:${kind}`, kind, level, value, message, details: {} },
    new Date(Date.now() - hoursAgo * HOUR),
  );

beforeAll(async () => {
  browser = await launchBrowser();
  const hash = await hashPassword(PASSWORD);
  const [farm] = await db().insert(farms).values({ name: "Zz Alert Page Farm", timezone: "Europe/Dublin" }).returning();
  farmId = farm!.id;
  keeperEmail = `alert-keeper-${Date.now()}@example.org`;
  const [k] = await db().insert(users).values({ email: keeperEmail, name: "Ada Keeper", passwordHash: hash }).returning();
  await db().insert(memberships).values({ userId: k!.id, farmId, role: "keeper" });
  const phone = await newSubscriber();
  await savePushSubscription(k!.id, { endpoint: phone.json.endpoint, p256dh: phone.json.keys.p256dh, auth: phone.json.keys.auth });

  const b = await place("Long Bed", ["fresh", "working"]);
  Object.assign(bed, { binId: b.binId, fresh: b.zones[0]!, working: b.zones[1]! });
  const s = await place("Shed Tote", ["working"]);
  Object.assign(shed, { binId: s.binId, zone: s.zones[0]! });
  // The fresh zone heats after a feeding 5 hours ago: 20 °C steady, then 1.5 °C/h (common practice
  // for a heavy feed's self-heating); the working zone rises fast but is still inside the band.
  await insertFeeding({
    farmId,
    binId: bed.binId,
    zoneId: bed.fresh,
    at: new Date(Date.now() - 5 * HOUR),
    byUserId: k!.id,
    notes: null,
    mixMoisturePct: 85,
    mixCn: 18,
    totalKg: 6,
    items: [{ ingredientId: null, name: "vegetable scraps", massKg: 6, moisturePct: 85, carbonPct: null, nitrogenPct: 2.5 }],
  });
  await probeWith(bed.fresh, `ape-fresh-${Date.now()}`, (h) => ({ temperature: h > 5 ? 20 : 20 + 1.5 * (5 - h), moisture: 78 }));
  await probeWith(bed.working, `ape-work-${Date.now()}`, (h) => ({ temperature: h > 2 ? 18 : 18 + 2 * (2 - h), moisture: 76 }));
  await probeWith(shed.zone, `ape-shed-${Date.now()}`, (h) => ({ temperature: 19, moisture: 72 - (8 - h) * 0.4 }));

  ids.heat = (await alertOf(bed.fresh, bed.binId, "heat", "act_now", 26.5, "Long Bed, fresh zone: 26.5 °C, rising 1.5 °C/h after a feeding", 1))!.id;
  ids.hot = (await alertOf(bed.working, bed.binId, "heat", "heads_up", 21.6, "Long Bed, working zone: rising 2.0 °C/h after a feeding", 0.5))!.id;
  ids.drying = (await alertOf(shed.zone, shed.binId, "drying", "heads_up", 70.4, "Shed Tote, working zone: drying toward 70 %", 2))!.id;
  // What the rule runner does on a raise: queue a push per phone in the delivery outbox.
  await notifyAlert((await getAlertRow(ids.heat))!, "raised");
});

afterAll(async () => {
  await browser?.close();
  if (farmId) {
    await db().execute(sql`delete from farms where id = ${farmId}`);
    await db().execute(sql`delete from users where email = ${keeperEmail}`);
  }
});

const pageErrors = new WeakMap<Page, string[]>();
async function signedIn(): Promise<Page> {
  const page = await (await browser.newContext(PHONE)).newPage();
  const errors: string[] = [];
  pageErrors.set(page, errors);
  page.on("pageerror", (e) => errors.push(e.message));
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(keeperEmail);
  await page.getByLabel("Password").fill(PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/farms\//);
  return page;
}

const top = (page: Page, selector: string) =>
  page
    .locator(selector)
    .first()
    .evaluate((el) => el.getBoundingClientRect().top + window.scrollY);

describe("an alert leads to the data", () => {
  it("A: the queued push opens the alert's page; the keeper claims, settles with a note, and finds it under settled", async () => {
    const row = (await db().execute(sql`select payload from deliveries where alert_id = ${ids.heat} and channel = 'push'`)).rows[0] as {
      payload: { push: { url: string; alertId: string }; mail: { text: string } };
    };
    expect(row.payload.push.url).toBe(`/farms/${farmId}/alerts/${ids.heat}`);
    expect(row.payload.mail.text).toContain(`${appUrl()}/farms/${farmId}/alerts/${ids.heat}`);
    const page = await signedIn();
    await page.goto(new URL(row.payload.push.url, appUrl()).href);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent(), SLOW).toBe("Heat alert");
    await expect.poll(() => page.getByText("rising 1.5 °C/h after a feeding").count(), SLOW).toBeGreaterThan(0);
    // The chart around the alert has drawn (a canvas), with its raise and the feeding in its words.
    await page.locator('figure[data-metric="temperature"] canvas').first().waitFor();
    expect(await page.locator('figure[data-metric="temperature"] [role="img"]').getAttribute("aria-label")).toMatch(/1 feeding marked; raised at/);

    await page.getByRole("button", { name: "I'm on it" }).click();
    await expect.poll(() => page.getByText("claimed by Ada Keeper").count(), SLOW).toBeGreaterThan(0);
    await page.getByLabel("Settle with a note").fill("Turned the fresh food under and opened the lid; bed cooling.");
    await page.getByRole("button", { name: "Settle this alert" }).click();
    await expect.poll(() => page.locator("[data-settle-note]").textContent(), SLOW).toBe("Turned the fresh food under and opened the lid; bed cooling.");
    const steps = await page.locator("[data-event]").evaluateAll((els) => els.map((e) => e.getAttribute("data-event")));
    expect(steps).toEqual(expect.arrayContaining(["raised", "claimed", "settled"]));
    expect(await page.locator('[data-event="claimed"]').textContent()).toMatch(/after raised/);
    await page.screenshot({ path: screenshotPath("alert-page-settled"), fullPage: true });

    await page.getByRole("link", { name: "All alerts" }).click();
    await page.waitForURL(/\/alerts$/);
    await page.getByRole("navigation", { name: "State" }).getByRole("link", { name: "Settled" }).click();
    await page.waitForURL(/state=settled/);
    const listed = page.locator(`li[data-alert-id="${ids.heat}"]`);
    await listed.waitFor();
    expect(await page.locator("li[data-alert-id]").evaluateAll((els) => els.map((e) => e.getAttribute("data-state")))).toEqual(["settled"]);
    await listed.getByRole("link").first().click();
    await page.waitForURL(new RegExp(`/alerts/${ids.heat}$`));
    await expect.poll(() => page.locator("[data-settle-note]").textContent(), SLOW).toContain("bed cooling");
    expect(pageErrors.get(page)).toEqual([]);
  });

  it("B: the zone page of a zone with an open alert shows the alert first, and no 'comfortable' beside it", async () => {
    const page = await signedIn();
    await page.goto(`${appUrl()}/farms/${farmId}/zones/${bed.working}`);
    await page.locator("[data-open-alerts]").waitFor();
    const alertTop = await top(page, "[data-open-alerts]");
    expect(alertTop).toBeLessThan(await top(page, 'section[aria-labelledby="now-h"]'));
    expect(alertTop).toBeLessThan(await top(page, 'section[aria-labelledby="charts-h"]'));
    const open = page.locator("[data-open-alerts]");
    expect(await open.textContent()).toContain("rising 2.0 °C/h after a feeding");
    // 22 °C is inside E. fetida's comfortable 15–25 °C band, but a heat alert is open on it.
    const values = await page.locator('section[aria-labelledby="now-h"]').textContent();
    expect(values).toContain("in the band, but a heat alert is open");
    expect(values).not.toMatch(/Temperature[^M]*comfortable/);
    // Where it is heading, in words: 2 °C/h over the last hour (E. fetida band from the species profile).
    expect(await page.locator('[data-heading="temperature"]').textContent()).toMatch(/Rising 2\.0 °C\/h over the last hour/);
    await page.screenshot({ path: screenshotPath("zone-open-alert"), fullPage: true });
    // On the chart too: a dashed line on from the latest reading into the next hours, and its words.
    const plot = page.locator('figure[data-metric="temperature"] [role="img"]');
    await expect.poll(() => plot.getAttribute("data-heading-to"), SLOW).not.toBeNull();
    expect(Number(await plot.getAttribute("data-heading-to")) * 1000).toBeGreaterThan(Date.now());
    expect(await plot.getAttribute("aria-label")).toMatch(/dashed on from the latest reading: Rising 2\.0 °C\/h over the last hour/);
    // At 30 days the chart draws hourly means, but its "latest" is still the newest reading, 22.0 °C
    // (the last hour's mean of a 2 °C/h rise would be about 21 °C).
    const chart = page.locator('figure[data-metric="temperature"]');
    await page.getByRole("group", { name: "Chart window" }).getByRole("button", { name: "30 days" }).click();
    await expect.poll(() => chart.locator("figcaption").textContent(), SLOW).toContain("hourly means");
    await expect.poll(() => chart.locator("p[aria-live]").textContent(), SLOW).toMatch(/^Latest 22\.0 °C, in the band, but a heat alert is open/);
    await open.getByRole("link", { name: /Open the alert/ }).click();
    await page.waitForURL(new RegExp(`/alerts/${ids.hot}$`));
    expect(pageErrors.get(page)).toEqual([]);
  });

  it("B2: the bin page says its open alerts before its zones, and no zone under a heat alert reads comfortable", async () => {
    const page = await signedIn();
    await page.goto(`${appUrl()}/farms/${farmId}/bins/${bed.binId}`);
    const open = page.locator('section[aria-labelledby="open-h"]');
    await open.waitFor();
    expect(await top(page, 'section[aria-labelledby="open-h"]')).toBeLessThan(await top(page, 'section[aria-labelledby="zones-h"]'));
    // Act now first, then the heads-up; the words they were raised with, and each opens its page.
    const cards = open.locator("[data-level]");
    const levels = await cards.evaluateAll((els) => els.map((e) => e.getAttribute("data-level")));
    // Test A settled the fresh zone's act-now alert; whatever is still open, act now comes first.
    const stillOpen = (await listAlerts(farmId, { open: true, binId: bed.binId })).map((o) => o.alert.level);
    expect([...levels].sort()).toEqual([...stillOpen].sort());
    expect(levels).toContain("heads_up");
    expect(levels).toEqual([...levels].sort((a, b) => Number(b === "act_now") - Number(a === "act_now")));
    expect(await open.textContent()).toContain("Long Bed, working zone: rising 2.0 °C/h after a feeding");
    expect(await open.locator(`a[href$="/alerts/${ids.hot}"]`).count()).toBeGreaterThan(0);
    // The working zone reads 22 °C, inside E. fetida's 15–25 °C (NC State Extension), under an open heat alert.
    const zones = await page.locator('section[aria-labelledby="zones-h"] li').allTextContents();
    const working = zones.find((z) => /working/i.test(z))!;
    expect(working).toMatch(/22\.0 °C\s*warm/);
    expect(working).not.toMatch(/°C\s*comfortable/);
    // The shed tote, with no alert on its temperature, still says comfortable: the rule is per zone.
    await page.goto(`${appUrl()}/farms/${farmId}/bins/${shed.binId}`);
    await page.locator('section[aria-labelledby="zones-h"]').waitFor();
    expect(await page.locator('section[aria-labelledby="zones-h"]').textContent()).toMatch(/19\.0 °C\s*comfortable/);
    expect(pageErrors.get(page)).toEqual([]);
  });

  it("C: the history filters by kind and by bin, and opens one alert with its chart and events", async () => {
    const page = await signedIn();
    await page.goto(`${appUrl()}/farms/${farmId}`);
    await page.getByRole("navigation", { name: "Farm" }).getByRole("link", { name: "Alerts" }).click();
    await page.waitForURL(/\/alerts$/);
    const listed = () => page.locator("li[data-alert-id]").evaluateAll((els) => els.map((e) => e.getAttribute("data-alert-id")));
    // Newest first: the working zone's (30 min ago), the fresh zone's (1 h), the tote's (2 h).
    await expect.poll(listed, SLOW).toEqual([ids.hot, ids.heat, ids.drying]);
    expect(await page.locator("main").innerText()).not.toMatch(/\bundefined\b|\bNaN\b|\bnull\b|\[object Object\]/);
    await page.screenshot({ path: screenshotPath("alert-history"), fullPage: true });

    await page.getByLabel("Kind").selectOption("drying");
    await page.getByRole("button", { name: "Show these alerts" }).click();
    await page.waitForURL(/kind=drying/);
    await expect.poll(listed, SLOW).toEqual([ids.drying]);

    await page.getByLabel("Kind").selectOption("");
    await page.getByLabel("Bin").selectOption({ label: "Long Bed" });
    await page.getByRole("button", { name: "Show these alerts" }).click();
    await page.waitForURL(new RegExp(`bin=${bed.binId}`));
    await expect.poll(listed, SLOW).toEqual([ids.hot, ids.heat]);

    await page.locator(`li[data-alert-id="${ids.hot}"]`).getByRole("link").first().click();
    await page.waitForURL(new RegExp(`/alerts/${ids.hot}$`));
    await page.locator('figure[data-metric="temperature"] canvas').first().waitFor();
    expect(await page.locator('figure[data-metric="temperature"] figcaption').textContent()).toContain("Temperature");
    expect(await page.locator("[data-event]").first().getAttribute("data-event")).toBe("raised");
    // Open, so it says where the reading is heading: the last hour's 2 °C/h rise.
    expect(await page.locator('[data-heading="temperature"]').textContent()).toContain("Rising 2.0 °C/h over the last hour.");
    // No internal words leak onto the page.
    expect(await page.locator("main").innerText()).not.toMatch(/\bundefined\b|\bNaN\b|\bnull\b|\[object Object\]/);
    await page.screenshot({ path: screenshotPath("alert-page-open"), fullPage: true });

    // A filter no alert matches says so in plain words.
    await page.goto(`${appUrl()}/farms/${farmId}/alerts?kind=ammonia`);
    expect(await page.getByText("No alerts match these filters.").count()).toBe(1);
    expect(pageErrors.get(page)).toEqual([]);
  });

  it("D: the history and an alert's page pass axe's WCAG 2 A and AA rules in the light and the dark theme", async () => {
    const axeSource = fs.readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
    type AxeRule = { id: string; nodes: { target: string[]; failureSummary?: string }[] };
    for (const scheme of ["light", "dark"] as const) {
      // The policy's nonce would refuse axe's injected script; the test's own context waives it.
      const context = await browser.newContext({ ...PHONE, bypassCSP: true });
      const page = await context.newPage();
      await page.emulateMedia({ colorScheme: scheme });
      await page.goto(`${appUrl()}/sign-in`);
      await page.getByLabel("E-mail").fill(keeperEmail);
      await page.getByLabel("Password").fill(PASSWORD);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(/\/farms\//);
      for (const [name, path, ready] of [
        ["history", `/farms/${farmId}/alerts`, "li[data-alert-id]"],
        ["alert", `/farms/${farmId}/alerts/${ids.drying}`, "figure[data-metric] canvas"],
      ] as const) {
        await page.goto(`${appUrl()}${path}`);
        await page.locator(ready).first().waitFor();
        await page.addScriptTag({ content: axeSource });
        const r = await page.evaluate(() =>
          (window as unknown as { axe: { run: (d: Document, o: object) => Promise<{ violations: AxeRule[]; incomplete: AxeRule[] }> } }).axe.run(document, {
            runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"] },
            resultTypes: ["violations", "incomplete"],
          }),
        );
        const found = [...r.violations, ...r.incomplete.filter((v) => v.id === "color-contrast")]
          .flatMap((v) => v.nodes.map((n) => `${v.id}: ${n.target.join(" ")} — ${n.failureSummary ?? ""}`))
          .filter((line) => !line.includes("only non-text characters"));
        expect([scheme, name, found]).toEqual([scheme, name, []]);
        await page.screenshot({ path: screenshotPath(`look-alert-${name}-${scheme}`), fullPage: true });
      }
      await context.close();
    }
  });
});
