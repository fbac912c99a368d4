// The pages under the content security policy in Chromium: a keeper signs in, opens Today, a bin and
// a zone with its charts, and the service worker registers; the browser reports no violation of the
// policy and no console error on the way.
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl, demoFarmId, signIn } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

type Violation = { directive: string; blocked: string; sample: string; url: string };

let browser: Browser;
let farmId: string;
let binId: string;
let zoneId: string;

beforeAll(async () => {
  browser = await launchBrowser();
  farmId = await demoFarmId();
  const keeper = await signIn("tomas@alder-row.example", "alder-row-demo");
  const bins = (await (await keeper.fetch(`/api/farms/${farmId}/bins`)).json()) as {
    bins: { id: string; name: string; zones?: { id: string; kind: string }[] }[];
  };
  const bed = bins.bins.find((b) => b.name === "Long Bed North")!;
  binId = bed.id;
  const zones = (await (await keeper.fetch(`/api/bins/${binId}/zones`)).json()) as { zones: { id: string; kind: string }[] };
  zoneId = zones.zones.find((z) => z.kind === "fresh")!.id;
});
afterAll(async () => {
  await browser?.close();
});

// Next's runtime announces itself on window once its (nonced) scripts have run and hydrated the page.
const nextRan = (page: Page) =>
  expect.poll(() => page.evaluate(() => Boolean((window as unknown as { next?: { version?: string } }).next?.version))).toBe(true);
const violationsOf = (page: Page) => page.evaluate(() => (window as unknown as { __cspViolations: Violation[] }).__cspViolations);

// A phone-sized context whose every document listens from its first line for what the policy
// blocked (CSP Level 3, the securitypolicyviolation event); DevTools-injected scripts are not
// themselves subject to the policy.
async function watchedContext() {
  const context = await browser.newContext(PHONE);
  await context.addInitScript(() => {
    const w = window as unknown as { __cspViolations: Violation[] };
    w.__cspViolations = [];
    document.addEventListener("securitypolicyviolation", (e) =>
      w.__cspViolations.push({ directive: e.effectiveDirective, blocked: e.blockedURI, sample: e.sample, url: e.documentURI }),
    );
  });
  return context;
}

describe("the content security policy", () => {
  it("the Today, bin and zone pages work under the content security policy", async () => {
    const context = await watchedContext();
    const page = await context.newPage();
    const errors: string[] = [];
    const seen: Violation[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    // Chromium also logs each refusal ("Refused to execute inline script ...") as a console error.
    page.on("console", (m) => {
      if (m.type() === "error") errors.push(m.text());
    });
    const collect = async () => seen.push(...(await violationsOf(page)));

    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill("tomas@alder-row.example");
    await page.getByLabel("Password").fill("alder-row-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/farms\//);
    // Today: every bin and zone, with a small chart per zone drawn on a canvas.
    await page.goto(`${appUrl()}/farms/${farmId}`);
    await page.getByRole("region", { name: "Long Bed North" }).waitFor();
    await expect.poll(() => page.locator("canvas").count()).toBeGreaterThan(0);
    await nextRan(page);
    await collect();

    await page.goto(`${appUrl()}/farms/${farmId}/bins/${binId}`);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Long Bed North");
    await page.getByRole("heading", { name: "Logbook", exact: true }).waitFor();
    await nextRan(page);
    await collect();

    await page.goto(`${appUrl()}/farms/${farmId}/zones/${zoneId}`);
    const chart = page.locator('figure[data-metric="temperature"] [role="img"]');
    await chart.locator("canvas").waitFor();
    // The band's place is measured after uPlot drew it: the chart ran, styles set through CSSOM included.
    await expect.poll(() => chart.getAttribute("data-band-top")).not.toBeNull();
    expect(await chart.locator(".u-over").evaluate((el) => (el as HTMLElement).style.width)).toMatch(/px$/);
    await page.screenshot({ path: screenshotPath("csp-zone") });
    await collect();

    // The service worker registers (worker-src) from the page that offers alerts on this phone.
    await page.goto(`${appUrl()}/me`);
    const worker = await page.evaluate(() => navigator.serviceWorker.ready.then((r) => r.active?.scriptURL ?? r.installing?.scriptURL ?? null));
    expect(worker).toBe(`${appUrl()}/sw.js`);
    await collect();

    expect(seen).toEqual([]);
    expect(errors).toEqual([]);
    await context.close();
  });

  it("a script injected into a page is refused and reported", async () => {
    const context = await watchedContext();
    const page = await context.newPage();
    // The page as if a stored name had slipped markup past the escaping: an inline script and an
    // inline handler in the served HTML, under the response's own policy and nonce.
    await page.route(`${appUrl()}/sign-in`, async (r) => {
      const res = await r.fetch();
      const html = (await res.text()).replace(
        "</body>",
        `<script>window.pwned = "script"</script><img id="planted" src="/icon.svg" onload="window.pwned = 'handler'"></body>`,
      );
      await r.fulfill({ response: res, body: html });
    });
    await page.goto(`${appUrl()}/sign-in`);
    await page.locator("#planted").evaluate((img) => (img as HTMLImageElement).decode().catch(() => null));
    await nextRan(page);
    expect(await page.evaluate(() => (window as unknown as { pwned?: string }).pwned ?? null)).toBeNull();
    const seen = await violationsOf(page);
    expect(seen.map((v) => v.directive).sort()).toEqual(["script-src-attr", "script-src-elem"]);
    await context.close();
  });
});
