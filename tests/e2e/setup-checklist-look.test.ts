// The setup checklist and the add-bin page in both themes (the phone's prefers-color-scheme): axe
// finds no violation of the WCAG 2 A and AA rules, colour contrast among them, with one step done,
// the rest to do, and a refused field on the add-bin page. Screenshots go to .data/screens/.
import fs from "node:fs";
import { createRequire } from "node:module";
import type { Browser, Page } from "playwright-core";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { addToFarm, appDb, makeFarm, makePerson, type Person } from "../integration/team/fixtures";

const axeSource = fs.readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
type AxeRule = { id: string; impact: string | null; help: string; nodes: { target: string[]; failureSummary?: string }[] };
type AxeResult = { violations: AxeRule[]; incomplete: AxeRule[] };

let browser: Browser;
let c: pg.Client;
let owner: Person;
let farmId: string;
beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
  owner = await makePerson(c, "Look owner");
  farmId = await makeFarm(c);
  await addToFarm(c, farmId, owner.id, "owner");
  // One step done (a bin), so both the done mark and the numbered steps are drawn.
  const bin = await c.query(`insert into bins (farm_id, name, style, species) values ($1, 'Look tote', 'tote', 'eisenia-fetida') returning id`, [farmId]);
  await c.query(`insert into zones (bin_id, position, kind) values ($1, 1, 'working')`, [bin.rows[0].id]);
});
afterAll(async () => {
  await browser?.close();
  await c?.end();
});

async function axe(page: Page): Promise<string[]> {
  if (!(await page.evaluate(() => "axe" in window))) await page.addScriptTag({ content: axeSource });
  const r = await page.evaluate(() =>
    (window as unknown as { axe: { run: (ctx: Document, o: object) => Promise<AxeResult> } }).axe.run(document, {
      runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"] },
      resultTypes: ["violations", "incomplete"],
    }),
  );
  return [...r.violations, ...r.incomplete.filter((v) => v.id === "color-contrast")].flatMap((v) =>
    v.nodes.map((n) => `${v.id} (${v.impact}): ${n.target.join(" ")} — ${n.failureSummary?.replace(/\s+/g, " ") ?? v.help}`),
  );
}

for (const scheme of ["light", "dark"] as const) {
  describe(`the setup pages in the ${scheme} theme`, () => {
    it("Today's checklist and the add-bin page with a refused name pass axe", async () => {
      // The policy's nonce would refuse axe's injected script; the test's own context waives it.
      const context = await browser.newContext({ ...PHONE, bypassCSP: true });
      const page = await context.newPage();
      await page.emulateMedia({ colorScheme: scheme });
      await page.goto(`${appUrl()}/sign-in`);
      await page.getByLabel("E-mail").fill(owner.email);
      await page.getByLabel("Password").fill(owner.password);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(/\/farms\//);

      await page.goto(`${appUrl()}/farms/${farmId}`);
      await page.locator("#setup-h").waitFor();
      expect(await page.locator("[data-step=bin] [data-mark=done]").count()).toBe(1);
      expect(await axe(page)).toEqual([]);
      await page.screenshot({ path: screenshotPath(`setup-look-today-${scheme}`) });

      await page.goto(`${appUrl()}/farms/${farmId}/bins/new`);
      await page.getByRole("button", { name: "Add", exact: true }).click();
      await expect.poll(() => page.getByText("Give it a name.").count()).toBe(1);
      // The refused field is scrolled to; axe cannot judge text passing under the sticky header, so it reads the page from the top.
      await page.evaluate(() => window.scrollTo(0, 0));
      expect(await axe(page)).toEqual([]);
      await page.screenshot({ path: screenshotPath(`setup-look-add-bin-${scheme}`), fullPage: true });
      await context.close();
    });
  });
}
