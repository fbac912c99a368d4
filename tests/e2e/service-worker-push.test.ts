// The registered service worker receives a push (delivered through the DevTools protocol, as a
// push service would) and shows the alert as a notification with a claim action.
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("the service worker", () => {
  it("shows a pushed alert as a notification with bin, zone, value and a claim action", async () => {
    const origin = appUrl();
    const context = await browser.newContext(PHONE);
    await context.grantPermissions(["notifications"], { origin });
    const page = await context.newPage();
    await page.goto(`${origin}/sign-in`);
    await page.getByLabel("E-mail").fill("tomas@alder-row.example");
    await page.getByLabel("Password").fill("alder-row-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/farms\//);

    const cdp = await context.newCDPSession(page);
    const registrations: { registrationId: string; scopeURL: string }[] = [];
    cdp.on("ServiceWorker.workerRegistrationUpdated", (e: { registrations: { registrationId: string; scopeURL: string; isDeleted: boolean }[] }) => {
      for (const r of e.registrations) if (!r.isDeleted) registrations.push(r);
    });
    await cdp.send("ServiceWorker.enable");
    await page.goto(`${origin}/me`);
    await page.evaluate(() => {
      (window as unknown as { pushes: unknown[] }).pushes = [];
      navigator.serviceWorker.addEventListener("message", (e) => (window as unknown as { pushes: unknown[] }).pushes.push(e.data));
    });
    await page.evaluate(() => navigator.serviceWorker.ready.then(() => true));
    await expect.poll(() => registrations.length).toBeGreaterThan(0);
    await page.screenshot({ path: screenshotPath("me-keeper") });

    const data = JSON.stringify({
      alertId: "00000000-0000-4000-8000-000000000001",
      kind: "heat",
      level: "act_now",
      title: "Act now: Heat · Long Bed North, fresh zone",
      body: "Long Bed North, fresh zone: 31.4 °C and rising 2.1 °C/h",
      url: "/",
    });
    await cdp.send("ServiceWorker.deliverPushMessage", { origin: `${origin}/`, registrationId: registrations[0]!.registrationId, data });

    await expect.poll(() => page.evaluate(() => (window as unknown as { pushes: unknown[] }).pushes.length), { timeout: 10_000 }).toBe(1);
    const shown = await page.evaluate(async () => {
      const reg = await navigator.serviceWorker.ready;
      return (await reg.getNotifications()).map((n) => ({
        title: n.title,
        body: n.body,
        tag: n.tag,
        actions: (n as unknown as { actions: { action: string; title: string }[] }).actions,
      }));
    });
    expect(shown).toHaveLength(1);
    expect(shown[0]!.title).toContain("Long Bed North");
    expect(shown[0]!.body).toContain("31.4 °C");
    expect(shown[0]!.actions.map((a) => a.action)).toEqual(["claim"]);
    await context.close();
  });
});
