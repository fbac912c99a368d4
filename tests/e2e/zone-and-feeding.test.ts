// Story line 3 by hand, at phone size: a keeper opens a zone from Today, reads its chart against the
// species' band, logs a heavy feeding for the fresh zone with the mix check, and sees it in the
// logbook and as a mark on the zone's chart. Viewers read but cannot log; a bad mass is refused
// beside its field.
import type { Browser, Locator, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { amendmentForMoisture, beddingForCn, checkMix, WORM_BED_TARGET, type MixItem } from "@/lib/domain/mix";
import { speciesProfiles } from "@/lib/domain/species";
import { formatMass, formatNumber, formatTemperature } from "@/lib/domain/units";
import { appUrl, signIn } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

type Ingredient = { id: string; key: string; name: string; moisturePct: number | null; nitrogenPct: number | null; cn: number | null };

let browser: Browser;
let farmId: string;
let library: Ingredient[];

beforeAll(async () => {
  browser = await launchBrowser();
  const keeper = await signIn("tomas@alder-row.example", "alder-row-demo");
  const farms = (await (await keeper.fetch("/api/farms")).json()) as { farms: { id: string; name: string }[] };
  farmId = farms.farms.find((f) => f.name === "Alder Row Worm Farm")!.id;
  library = ((await (await keeper.fetch(`/api/farms/${farmId}/ingredients`)).json()) as { ingredients: Ingredient[] }).ingredients;
});
afterAll(async () => {
  await browser?.close();
});

// Browser-side errors per page (hydration mismatches, uncaught exceptions); each test expects none.
const pageErrors = new WeakMap<Page, string[]>();

async function signedIn(email: string): Promise<Page> {
  const page = await (await browser.newContext(PHONE)).newPage();
  const errors: string[] = [];
  pageErrors.set(page, errors);
  page.on("pageerror", (e) => errors.push(e.message));
  page.on("console", (m) => {
    // the browser logs every 4xx answer; a 422 is the refusal the bad-mass test asks for
    if (m.type() === "error" && !m.text().includes("status of 422")) errors.push(m.text());
  });
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("alder-row-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/farms\//);
  await page.goto(`${appUrl()}/farms/${farmId}`);
  return page;
}

const lib = (key: string) => {
  const row = library.find((i) => i.key === key);
  if (!row) throw new Error(`library has no ${key}`);
  return row;
};
const asItem = (i: Ingredient, massKg: number): MixItem => ({ name: i.name, massKg, moisturePct: i.moisturePct!, nitrogenPct: i.nitrogenPct!, cn: i.cn! });
const mustOk = <T>(r: { ok: true; value: T } | { ok: false; error: { message: string } }): T => {
  if (!r.ok) throw new Error(r.error.message);
  return r.value;
};

/** Share of sampled plot pixels, over a few rows between y0 and y1 (CSS px), that carry the band's green tint. */
async function tintedShare(chart: Locator, y0: number, y1: number): Promise<number> {
  return chart.evaluate(
    (el, [a, b]) => {
      const canvas = el.querySelector("canvas")!;
      const ctx = canvas.getContext("2d")!;
      const r = canvas.width / canvas.getBoundingClientRect().width;
      const left = Number((el as HTMLElement).dataset.plotLeft);
      const width = Number((el as HTMLElement).dataset.plotWidth);
      let tinted = 0;
      let n = 0;
      // rows at uneven fractions, so that at most one lands on a horizontal grid line
      for (const f of [0.13, 0.31, 0.47, 0.62, 0.79, 0.91]) {
        const y = a + (b - a) * f;
        for (let k = 1; k < 24; k++) {
          const d = ctx.getImageData(Math.round((left + (width * k) / 24) * r), Math.round(y * r), 1, 1).data;
          n += 1;
          // the band is a translucent leaf green (79, 125, 58) over a clear canvas
          if (d[3]! > 15 && d[3]! < 110 && d[1]! > d[0]! && d[1]! > d[2]!) tinted += 1;
        }
      }
      return tinted / n;
    },
    [y0, y1] as const,
  );
}

describe("the zone page and logging a feeding", () => {
  it("a keeper opens a zone from Today, logs a heavy feeding with the mix check, and sees it in the logbook and on the chart", async () => {
    const page = await signedIn("tomas@alder-row.example");
    const fetida = speciesProfiles["eisenia-fetida"];

    // Today → the fresh zone of the flow-through bin
    await page.getByRole("region", { name: "Long Bed North" }).getByRole("link", { name: "Fresh zone" }).click();
    await page.waitForURL(/\/zones\//);
    const zoneUrl = page.url();
    const zoneId = zoneUrl.split("/zones/")[1]!.split(/[?#]/)[0]!;
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Fresh zone");

    const chart = page.locator('figure[data-metric="temperature"] [role="img"]');
    await chart.locator("canvas").waitFor();
    const label = (await chart.getAttribute("aria-label"))!;
    const bandWords = `comfortable ${formatTemperature(fetida.temperatureC.comfortLow, "metric", { digits: 0 })}–${formatTemperature(fetida.temperatureC.comfortHigh, "metric", { digits: 0 })}`;
    expect(label).toContain("Temperature, last 24 hours: latest ");
    expect(label).toContain(`${bandWords} shaded`);
    expect(await chart.getAttribute("data-band-low")).toBe(String(fetida.temperatureC.comfortLow));
    expect(await chart.getAttribute("data-band-high")).toBe(String(fetida.temperatureC.comfortHigh));

    // The band is drawn where the chart says it is: tinted inside, clear above and below it.
    await expect.poll(() => chart.getAttribute("data-band-top")).not.toBeNull();
    const geo = await chart.evaluate((el) => {
      const d = (el as HTMLElement).dataset;
      return { bandTop: Number(d.bandTop), bandBottom: Number(d.bandBottom), plotTop: Number(d.plotTop), plotHeight: Number(d.plotHeight) };
    });
    expect(geo.bandBottom - geo.bandTop).toBeGreaterThan(20);
    expect(await tintedShare(chart, geo.bandTop + 2, geo.bandBottom - 2)).toBeGreaterThan(0.6);
    expect(geo.bandTop - geo.plotTop).toBeGreaterThan(4);
    expect(await tintedShare(chart, geo.plotTop + 1, geo.bandTop - 2)).toBeLessThan(0.2);
    expect(await tintedShare(chart, geo.bandBottom + 2, geo.plotTop + geo.plotHeight - 1)).toBeLessThan(0.2);
    await page.screenshot({ path: screenshotPath("zone-24h"), fullPage: true });

    // 7 days: aggregated points, so a low–high band is drawn and said
    await page.getByRole("group", { name: "Chart window" }).getByRole("button", { name: "7 days" }).click();
    await expect.poll(() => chart.getAttribute("aria-label")).toContain("last 7 days");
    await expect.poll(() => page.locator('figure[data-metric="temperature"] figcaption').textContent()).toContain("low–high shaded");
    await page.locator('figure[data-metric="temperature"]').scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("zone-7d") });
    await page.getByRole("group", { name: "Chart window" }).getByRole("button", { name: "24 h" }).click();

    // The zone page sends a keeper to the bin's form with this zone chosen.
    await page.getByRole("link", { name: "Log a feeding here" }).click();
    await page.waitForURL(/\/bins\/[^/?#]+\?zone=/);
    const form = page.locator("form#log");
    await expect.poll(() => form.getByLabel("Where").inputValue()).toBe(zoneId);

    const veg = lib("vegetable-scraps");
    const card = lib("corrugated-cardboard");
    const vegKg = 3;
    const cardKg = 0.4;

    await form.getByLabel("Find an ingredient").fill("vegetable");
    await form.getByRole("button", { name: veg.name }).click();
    await form.getByLabel("Mass (kg)").first().fill(String(vegKg));

    // Scraps alone: the live check and its hints agree with lib/domain/mix.ts for the same inputs.
    const alone = mustOk(checkMix([asItem(veg, vegKg)]));
    await expect.poll(() => form.locator("#mix-moisture").textContent()).toBe(formatNumber(alone.moisturePct, 1));
    expect(await form.locator("#mix-cn").textContent()).toBe(formatNumber(alone.cn!, 1));
    expect(await form.locator("#mix-verdict").textContent()).toContain(alone.verdict);
    const aim = Math.round((WORM_BED_TARGET.moisturePct.low + WORM_BED_TARGET.moisturePct.high) / 2);
    const cardForMoisture = mustOk(
      amendmentForMoisture([asItem(veg, vegKg)], { name: card.name, moisturePct: card.moisturePct!, nitrogenPct: card.nitrogenPct!, cn: card.cn! }, aim),
    );
    const cardForCn = mustOk(
      beddingForCn([asItem(veg, vegKg)], { name: card.name, moisturePct: card.moisturePct!, nitrogenPct: card.nitrogenPct!, cn: card.cn! }, 25),
    );
    const hints = await form.locator("#mix-hints").textContent();
    if (alone.issues.includes("too wet"))
      expect(hints).toContain(`Add ${formatMass(cardForMoisture, "metric", { digits: 2 })} of ${card.name} to reach ${aim} % moisture.`);
    if (alone.issues.includes("too rich in nitrogen"))
      expect(hints).toContain(`Add ${formatMass(cardForCn, "metric", { digits: 2 })} of ${card.name} to reach C:N 25.`);
    expect(alone.issues.length).toBeGreaterThan(0);
    await page.screenshot({ path: screenshotPath("feeding-form-scraps-alone"), fullPage: true });

    await form.getByLabel("Find an ingredient").fill("cardboard");
    await form.getByRole("button", { name: card.name }).click();
    await form.getByLabel("Mass (kg)").nth(1).fill(String(cardKg));

    const both = mustOk(checkMix([asItem(veg, vegKg), asItem(card, cardKg)]));
    await expect.poll(() => form.locator("#mix-moisture").textContent()).toBe(formatNumber(both.moisturePct, 1));
    expect(await form.locator("#mix-cn").textContent()).toBe(formatNumber(both.cn!, 1));
    expect(await form.locator("#mix-total").textContent()).toBe(formatMass(both.totalMassKg, "metric", { digits: 2 }));
    expect(await form.locator("#mix-verdict").textContent()).toContain(both.verdict);
    await form.getByRole("list", { name: "Items in this feeding" }).scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("feeding-form-mix-check") });

    await form.getByRole("button", { name: "Log this feeding" }).click();
    const total = formatMass(both.totalMassKg, "metric", { digits: 2 });
    await expect.poll(() => form.getByRole("status").textContent()).toContain(`Logged ${total} for Fresh zone: ${both.verdict}.`);
    expect(await form.getByRole("list", { name: "Items in this feeding" }).count()).toBe(0);

    // The bin's one logbook shows it first, with its items, total, mix moisture and C:N, where and by
    // whom. The demo's own feedings hold the same ingredients, so wait for this one's total.
    const first = page.getByRole("list", { name: "Logbook, newest first" }).getByRole("listitem").first();
    await expect.poll(() => first.getAttribute("data-kind")).toBe("feeding");
    await expect.poll(() => first.textContent()).toContain(total);
    const entry = (await first.textContent())!;
    expect(entry).toContain(veg.name);
    expect(entry).toContain(card.name);
    expect(entry).toContain("Fresh zone");
    expect(entry).toContain(`moisture ${formatNumber(both.moisturePct, 1)} %`);
    expect(entry).toContain(`C:N ${formatNumber(both.cn!, 1)}`);
    expect(entry).toContain("by Tomás Reyes");
    await page.getByRole("heading", { name: "Logbook", exact: true }).scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("bin-logbook-after-feeding") });

    // Back on the zone's chart the feeding is a mark on the time axis; tapping it says what was fed.
    await page
      .getByRole("region", { name: "Zones" })
      .getByRole("link", { name: /Fresh zone/ })
      .click();
    await page.waitForURL(/\/zones\//);
    const marks = page.getByRole("list", { name: "Feedings on the temperature chart" }).getByRole("button");
    await expect.poll(() => marks.count()).toBeGreaterThan(0);
    const markLabels = await marks.evaluateAll((bs) => bs.map((b) => b.getAttribute("aria-label") ?? ""));
    const ours = markLabels.findIndex((l) => l.includes("Fresh zone") && l.includes(total) && l.includes(both.verdict));
    expect(ours).toBeGreaterThanOrEqual(0);
    await expect.poll(() => chart.getAttribute("aria-label")).toMatch(/[1-9]\d* feedings? marked/);
    // the mark sits inside the plot, near its right edge (the feeding is the newest moment of the window;
    // when the chart draws where the readings are heading, the axis runs an eighth of the window past now,
    // so now sits at 1/1.125 ≈ 0.89 of the width)
    const box = (await marks.nth(ours).boundingBox())!;
    const plot = await chart.evaluate((el) => {
      const r = el.getBoundingClientRect();
      const d = (el as HTMLElement).dataset;
      return { left: r.left + Number(d.plotLeft), width: Number(d.plotWidth) };
    });
    const centre = box.x + box.width / 2;
    expect(centre).toBeGreaterThan(plot.left + plot.width * 0.85);
    expect(centre).toBeLessThanOrEqual(plot.left + plot.width);
    expect(centre).toBeLessThanOrEqual(plot.left + plot.width + 1);
    await marks.nth(ours).click();
    const detail = page.locator('figure[data-metric="temperature"] p[aria-live="polite"]');
    await expect
      .poll(() => detail.textContent())
      .toContain(`${total} · moisture ${formatNumber(both.moisturePct, 1)} % · C:N ${formatNumber(both.cn!, 1)} · ${both.verdict}`);
    await page.locator('figure[data-metric="temperature"]').scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("zone-feeding-mark") });
    expect(pageErrors.get(page)).toEqual([]);
    await page.context().close();
  });

  it("a bad mass is refused beside its field and nothing is logged", async () => {
    const page = await signedIn("tomas@alder-row.example");
    await page.getByRole("region", { name: "Long Bed North" }).getByRole("link", { name: "Long Bed North" }).click();
    await page.waitForURL(/\/bins\//);
    // The feeding form opens from the bin page's Log button.
    await page.locator('section[aria-labelledby="log-h"] summary').click();
    await page
      .getByRole("list", { name: "What to log" })
      .getByRole("link", { name: /^Feeding/ })
      .click();
    await page.waitForURL(/\?log=feeding/);
    const form = page.locator("form#log");
    const binId = page.url().split("/bins/")[1]!.split(/[?#]/)[0]!;
    const keeper = await signIn("tomas@alder-row.example", "alder-row-demo");
    const logged = async () => ((await (await keeper.fetch(`/api/bins/${binId}/feedings`)).json()) as { feedings: unknown[] }).feedings.length;
    const before = await logged();
    const veg = lib("vegetable-scraps");
    await form.getByLabel("Find an ingredient").fill("vegetable");
    await form.getByRole("button", { name: veg.name }).click();
    const mass = form.getByLabel("Mass (kg)").first();

    for (const bad of ["0", "-2"]) {
      await mass.fill(bad);
      await form.getByRole("button", { name: "Log this feeding" }).click();
      await expect.poll(() => mass.getAttribute("aria-invalid")).toBe("true");
      const errorId = (await mass.getAttribute("aria-describedby"))!;
      const error = form.locator(`[id="${errorId}"]`);
      // a plain sentence beside the field, without the field's name (items.0.massKg) in front
      await expect.poll(() => error.textContent()).toMatch(/^Mass must be more than 0/);
      // the message sits right under the mass input, not somewhere else on the page
      const [m, e] = [(await mass.boundingBox())!, (await error.boundingBox())!];
      expect(e.y).toBeGreaterThanOrEqual(m.y + m.height - 1);
      expect(e.y).toBeLessThan(m.y + m.height + 40);
      expect(await form.getByRole("status").textContent()).toContain("Not logged.");
    }
    await mass.scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("feeding-form-bad-mass") });
    expect(await logged()).toBe(before);
    expect(pageErrors.get(page)).toEqual([]);
    await page.context().close();
  });

  it("a viewer reads the logbook and the zone but gets no feeding form", async () => {
    // A whole-bin feeding logged through the API by the keeper, for the viewer to read.
    const keeper = await signIn("tomas@alder-row.example", "alder-row-demo");
    const bins = ((await (await keeper.fetch(`/api/farms/${farmId}/bins`)).json()) as { bins: { id: string; name: string }[] }).bins;
    const binId = bins.find((b) => b.name === "Long Bed North")!.id;
    const straw = lib("straw");
    const res = await keeper.fetch(`/api/bins/${binId}/feedings`, {
      method: "POST",
      json: { zoneId: null, items: [{ ...asItem(straw, 0.75), ingredientId: straw.id }] },
    });
    expect(res.status).toBe(201);
    const straws = mustOk(checkMix([asItem(straw, 0.75)]));

    const page = await signedIn("class5b@alder-row.example");
    await page.getByRole("region", { name: "Long Bed North" }).getByRole("link", { name: "Long Bed North" }).click();
    await page.waitForURL(/\/bins\//);
    // The bin page's one logbook: the feeding first, with its total and mix moisture, for the whole bin.
    const logbook = page.getByRole("list", { name: "Logbook, newest first" });
    const first = logbook.getByRole("listitem").first();
    await expect.poll(() => first.getAttribute("data-kind")).toBe("feeding");
    const entry = (await first.textContent())!;
    expect(entry).toContain("Whole bin");
    expect(entry).toContain(formatMass(0.75, "metric", { digits: 2 }));
    expect(entry).toContain(`moisture ${formatNumber(straws.moisturePct, 1)} %`);
    expect(await page.locator("form#log").count()).toBe(0);
    expect(await page.getByRole("button", { name: "Log this feeding" }).count()).toBe(0);
    await page.screenshot({ path: screenshotPath("bin-viewer"), fullPage: true });

    await page
      .getByRole("region", { name: "Zones" })
      .getByRole("link", { name: /Fresh zone/ })
      .click();
    await page.waitForURL(/\/zones\//);
    await page.locator('figure[data-metric="temperature"] canvas').waitFor();
    expect(await page.getByRole("link", { name: "Log a feeding here" }).count()).toBe(0);
    expect(pageErrors.get(page)).toEqual([]);
    await page.context().close();
  });
});
