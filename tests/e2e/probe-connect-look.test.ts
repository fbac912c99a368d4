// The connect box and a probe's page with a refused message, in the light and the dark theme: axe
// finds no WCAG 2 A or AA violation, colour contrast among them, and the refusal reads in plain words.
import fs from "node:fs";
import { createRequire } from "node:module";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { REFUSAL_SENTENCES } from "@/lib/domain/refusal-words";
import { appUrl, demoFarmId } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

const axeSource = fs.readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
type AxeRule = { id: string; help: string; nodes: { target: string[]; failureSummary?: string }[] };
type AxeResult = { violations: AxeRule[]; incomplete: AxeRule[] };

async function axe(page: Page): Promise<string[]> {
  await page.evaluate(() => window.scrollTo(0, 0));
  if (!(await page.evaluate(() => "axe" in window))) await page.addScriptTag({ content: axeSource });
  const r = await page.evaluate(() =>
    (window as unknown as { axe: { run: (ctx: Document, o: object) => Promise<AxeResult> } }).axe.run(document, {
      runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"] },
    }),
  );
  return [...r.violations, ...r.incomplete.filter((v) => v.id === "color-contrast")].flatMap((v) =>
    v.nodes
      .map((n) => `${v.id}: ${n.target.join(" ")} — ${n.failureSummary?.replace(/\s+/g, " ") ?? v.help}`)
      .filter((line) => !(v.id === "color-contrast" && line.includes("only non-text characters"))),
  );
}

let browser: Browser;
let farmId: string;
beforeAll(async () => {
  browser = await launchBrowser();
  farmId = await demoFarmId();
});
afterAll(async () => {
  await browser?.close();
});

for (const scheme of ["light", "dark"] as const) {
  describe(`connecting a probe in the ${scheme} theme`, () => {
    it("the connect box and the probe's page with a refusal pass axe", async () => {
      // The policy's nonce would refuse axe's injected script; the test's own context waives it.
      const context = await browser.newContext({ ...PHONE, bypassCSP: true, colorScheme: scheme });
      const page = await context.newPage();
      await page.goto(`${appUrl()}/sign-in`);
      await page.getByLabel("E-mail").fill("noor@alder-row.example");
      await page.getByLabel("Password").fill("alder-row-demo");
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(/\/farms\//);
      await page.goto(`${appUrl()}/farms/${farmId}/probes`);
      const code = `look-${scheme}-${Date.now().toString(36)}`;
      await page.getByLabel("Probe code").fill(code);
      await page.getByRole("button", { name: "Register" }).click();
      const box = page.locator(`[data-connect-probe="${code}"]`);
      await box.waitFor();
      const token = (await box.locator("[data-token]").textContent())!;
      await box.screenshot({ path: screenshotPath(`probe-connect-box-${scheme}`) });
      expect(await axe(page)).toEqual([]);

      await box.getByRole("link", { name: "Watch for its first reading" }).click();
      await page.waitForURL(/\/probes\/\d+$/);
      // "C" is not a SenML unit; "Cel" is (RFC 8428 Table 6).
      const res = await fetch(`${appUrl()}/api/ingest`, {
        method: "POST",
        headers: { authorization: `Bearer ${code}.${token}`, "content-type": "application/senml+json" },
        body: JSON.stringify([{ bn: `urn:dev:wormward:${code}:`, n: "temp", u: "C", v: 20 }]),
      });
      expect(res.status).toBe(202);
      // No reload: the waiting page asks again by itself and shows the refusal.
      await expect.poll(() => page.locator("[data-latest-refusal]").textContent(), { timeout: 15_000 }).toContain(REFUSAL_SENTENCES["bad-unit"]);
      expect(await page.locator("[data-refusal]").count()).toBe(1);
      await page.screenshot({ path: screenshotPath(`probe-refused-${scheme}`), fullPage: true });
      expect(await axe(page)).toEqual([]);
      await context.close();
    });
  });
}
