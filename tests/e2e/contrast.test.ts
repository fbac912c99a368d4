// The look in both themes (issue 10, items 2 and 10): with a heads-up and an act-now alert open, the
// demo owner opens Today, a bin, a zone, the probes, a bin's rules and the You page on a phone, in
// the light theme and in the dark one (the phone's setting, prefers-color-scheme), and axe finds no
// violation of the WCAG 2 A and AA rules, colour contrast among them. Screenshots of each page go to
// .data/screens/look-<page>-<theme>.png to be looked at.
import fs from "node:fs";
import { createRequire } from "node:module";
import pg from "pg";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { appUrl, demoFarmId } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

const axeSource = fs.readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");

type AxeRule = { id: string; impact: string | null; help: string; nodes: { target: string[]; failureSummary?: string }[] };
type AxeResult = { violations: AxeRule[]; incomplete: AxeRule[] };

let browser: Browser;
let farmId: string;
let binId: string;
let zoneId: string;
const made: string[] = [];

async function db<T>(fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

beforeAll(async () => {
  browser = await launchBrowser();
  farmId = await demoFarmId();
  await db(async (c) => {
    const bin = (await c.query(`select id from bins where farm_id = $1 and name = 'Long Bed North'`, [farmId])).rows[0];
    binId = bin.id;
    zoneId = (await c.query(`select id from zones where bin_id = $1 and kind = 'fresh' order by position limit 1`, [binId])).rows[0].id;
    const owner = (await c.query(`select id from users where email = 'noor@alder-row.example'`)).rows[0].id;
    // Both levels open on Today, and a claimed and a settled one in the zone's list; subjects of
    // their own, so no rule's open alert is in the way, and removed afterwards.
    const rows = [
      { kind: "heat", level: "act_now", state: "raised", message: "Fresh zone at 31.2 °C, rising 2.1 °C an hour since the 1.5 kg feeding at 06:40." },
      { kind: "drying", level: "heads_up", state: "raised", message: "Fresh zone at 58 % moisture, below the comfortable 60–85 %." },
      { kind: "ammonia", level: "heads_up", state: "claimed", message: "Fresh zone at 22 ppm ammonia, over the heads-up line of 20 ppm." },
      { kind: "chill", level: "act_now", state: "settled", message: "Fresh zone at 9.8 °C, below the act-now line." },
    ];
    for (const r of rows) {
      const q = await c.query(
        `insert into alerts (farm_id, bin_id, zone_id, kind, level, state, subject, message, raised_at, claimed_at, claimed_by, settled_at, act_now_at)
         values ($1, $2, $3, $4::alert_kind, $5::text::alert_level, $6::text::alert_state, $7, $8, now() - interval '25 minutes',
                 case when $6::text <> 'raised' then now() - interval '20 minutes' end, case when $6::text <> 'raised' then $9::uuid end,
                 case when $6::text = 'settled' then now() - interval '5 minutes' end, case when $5::text = 'act_now' then now() - interval '25 minutes' end)
         returning id`,
        [farmId, binId, zoneId, r.kind, r.level, r.state, `look-test:${zoneId}:${r.kind}`, r.message, owner],
      );
      made.push(q.rows[0].id);
    }
  });
});

afterAll(async () => {
  await browser?.close();
  if (made.length) await db((c) => c.query(`delete from alerts where id = any($1::uuid[])`, [made]));
});

const PAGES = [
  { name: "today", path: () => `/farms/${farmId}`, ready: "#alerts-h" },
  { name: "bin", path: () => `/farms/${farmId}/bins/${binId}`, ready: "#zones-h" },
  { name: "zone", path: () => `/farms/${farmId}/zones/${zoneId}`, ready: "figure[data-metric] canvas" },
  { name: "probes", path: () => `/farms/${farmId}/probes`, ready: "main h2, main li" },
  { name: "logbook", path: () => `/farms/${farmId}/logbook`, ready: "#entries-h" },
  { name: "rules", path: () => `/farms/${farmId}/bins/${binId}/rules`, ready: "main section" },
  { name: "you", path: () => `/me`, ready: "main h1" },
] as const;

/** Runs axe on the page as it is: every WCAG 2.0/2.1 A and AA rule, colour contrast among them. */
async function axe(page: Page): Promise<AxeResult> {
  if (!(await page.evaluate(() => "axe" in window))) await page.addScriptTag({ content: axeSource });
  return page.evaluate(() =>
    (window as unknown as { axe: { run: (ctx: Document, o: object) => Promise<AxeResult> } }).axe.run(document, {
      runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"] },
      resultTypes: ["violations", "incomplete"],
    }),
  );
}

// A violation fails, and so does text whose contrast axe left undecided (it files text the colour of
// its background there, as if it were hidden): that is where a theme's mistake hides. Arrows and
// other symbols beside words ("← Today") are left to axe's judgement.
const said = (r: AxeResult) =>
  [...r.violations, ...r.incomplete.filter((v) => v.id === "color-contrast")].flatMap((v) =>
    v.nodes
      .map((n) => `${v.id} (${v.impact}): ${n.target.join(" ")} — ${n.failureSummary?.replace(/\s+/g, " ") ?? v.help}`)
      .filter((line) => !(v.id === "color-contrast" && line.includes("only non-text characters"))),
  );

for (const scheme of ["light", "dark"] as const) {
  describe(`the ${scheme} theme`, () => {
    let context: BrowserContext;
    let page: Page;
    beforeAll(async () => {
      // The policy's nonce would refuse axe's injected script; the test's own context waives it.
      context = await browser.newContext({ ...PHONE, bypassCSP: true });
      page = await context.newPage();
      await page.emulateMedia({ colorScheme: scheme });
      await page.goto(`${appUrl()}/sign-in`);
      expect(await axe(page).then(said)).toEqual([]);
      await page.screenshot({ path: screenshotPath(`look-sign-in-${scheme}`) });
      await page.getByLabel("E-mail").fill("noor@alder-row.example");
      await page.getByLabel("Password").fill("alder-row-demo");
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(/\/farms\//);
    });
    afterAll(async () => {
      await context?.close();
    });

    it.each(PAGES)("$name passes axe's WCAG 2 A and AA rules", async ({ name, path, ready }) => {
      await page.goto(`${appUrl()}${path()}`);
      await page.locator(ready).first().waitFor();
      await expect.poll(() => page.getByText("Loading", { exact: false }).count()).toBe(0);
      expect(await page.evaluate(() => matchMedia("(prefers-color-scheme: dark)").matches)).toBe(scheme === "dark");
      if (name === "today") {
        // Both levels, each with its word and its own mark, and the heat alert's caution.
        const cards = page.locator("[data-level]");
        await expect.poll(() => cards.count()).toBeGreaterThanOrEqual(2);
        await expect.poll(() => page.locator('[data-level="act_now"] [data-mark="actNow"]').count()).toBeGreaterThan(0);
        await expect.poll(() => page.locator('[data-level="heads_up"] [data-mark="headsUp"]').count()).toBeGreaterThan(0);
        await expect.poll(() => page.locator('[data-level="act_now"]', { hasText: "air the room" }).count()).toBeGreaterThan(0);
      }
      await page.screenshot({ path: screenshotPath(`look-${name}-${scheme}`), fullPage: name !== "today" });
      if (name === "today") await page.screenshot({ path: screenshotPath(`look-${name}-${scheme}-full`), fullPage: true });
      if (name === "zone") {
        await page
          .locator("figure[data-metric]")
          .first()
          .screenshot({ path: screenshotPath(`look-zone-chart-${scheme}`) });
        await page
          .locator("section", { has: page.getByRole("heading", { name: "Alerts in this zone" }) })
          .screenshot({ path: screenshotPath(`look-zone-alerts-${scheme}`) });
      }
      // From the top, so the sticky header covers nothing axe must read.
      await page.evaluate(() => window.scrollTo(0, 0));
      expect(said(await axe(page))).toEqual([]);
    });
  });
}
