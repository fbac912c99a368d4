// A zone's year on a phone (390 × 844): with a year of hourly rollups and a few days of readings
// written for one demo zone's probe, choosing "1 year" draws day points across the whole range, the
// logbook's feeding, watering, shift and harvest as marks, and a finger dragged along the chart
// reads the day, the value in the farm's units and the mark there in the large legend above it.
// Every other zone of the bin is on one chart below. What the test writes, it removes.
import pg from "pg";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";

const DAY = 86_400_000;
const HOUR = 3_600_000;
const SLOW = { timeout: 20_000 };

let c: pg.Client;
let browser: Browser;
let place: { farmId: string; binId: string; zoneId: string; fromZoneId: string; probeIds: number[] };
// What this file wrote, to take out again (rows that were already there are left alone).
const written = {
  rollups: [] as { probe_id: number; metric: string; hour: Date }[],
  readings: [] as { probe_id: number; metric: string; ts: Date }[],
  logs: [] as [string, string][],
};
const now = Date.now();

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  const z = await c.query(
    `select b.farm_id, b.id as bin_id, z.id as zone_id, (select id from zones where bin_id = b.id and position = 1) as from_zone,
            array(select p.id from probes p where p.zone_id = z.id) as probes
     from bins b join zones z on z.bin_id = b.id where b.name = 'Tray Tower' and z.kind = 'working'`,
  );
  const r = z.rows[0];
  place = { farmId: r.farm_id, binId: r.bin_id, zoneId: r.zone_id, fromZoneId: r.from_zone, probeIds: r.probes };
  // A year of hourly rollups (temperature and moisture) up to a day ago: a seasonal swing of a
  // few degrees and a daily one, invented for this test.
  const ins = await c.query(
    `insert into reading_rollups (probe_id, metric, hour, min, max, sum, count)
     select p, m, h, v - 0.6, v + 0.6, v * 12, 12
     from unnest($1::int[]) p,
          generate_series(date_trunc('hour', now() - interval '366 days'), now() - interval '25 hours', interval '1 hour') h,
          lateral (select unnest(array['temperature', 'moisture']::metric[]) as m) ms,
          lateral (select case when m = 'temperature'
                               then 21 + 3 * sin(2 * pi() * extract(epoch from h) / 31557600) + sin(2 * pi() * extract(hour from h) / 24)
                               else 75 + 2 * cos(2 * pi() * extract(epoch from h) / 31557600) end as v) vs
     on conflict do nothing
     returning probe_id, metric::text, hour`,
    [place.probeIds],
  );
  written.rollups = ins.rows;
  // A few days of raw readings, older than the seeded last day, every 10 minutes.
  const raw = await c.query(
    `insert into readings (probe_id, metric, ts, value)
     select p, 'temperature', t, 21 + sin(2 * pi() * extract(hour from t) / 24)
     from unnest($1::int[]) p, generate_series(now() - interval '4 days', now() - interval '26 hours', interval '10 minutes') t
     on conflict do nothing
     returning probe_id, metric::text, ts`,
    [place.probeIds],
  );
  written.readings = raw.rows;
  // One of each logbook entry over the year: the chart marks each with its own shape.
  const log = async (table: string, cols: string, values: unknown[]) => {
    const params = values.map((_, i) => `$${i + 1}`).join(", ");
    const row = await c.query(`insert into ${table} (${cols}) values (${params}) returning id`, values);
    written.logs.push([table, row.rows[0].id]);
  };
  const at = (days: number) => new Date(now - days * DAY);
  await log("feedings", "farm_id, bin_id, zone_id, at, total_kg", [place.farmId, place.binId, place.zoneId, at(300), 2.5]);
  await log("waterings", "farm_id, bin_id, zone_id, at, litres", [place.farmId, place.binId, null, at(200), 4]);
  await log("shifts", "farm_id, bin_id, zone_id, to_zone_id, at, volume_l", [place.farmId, place.binId, place.fromZoneId, place.zoneId, at(120), 12]);
  await log("harvests", "farm_id, bin_id, zone_id, at, mass_kg", [place.farmId, place.binId, place.zoneId, at(40), 5.5]);
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  for (const [table, id] of written.logs) await c.query(`delete from ${table} where id = $1`, [id]);
  const cols = <T extends Record<string, unknown>>(rows: T[], k: keyof T) => rows.map((x) => x[k]);
  await c.query(`delete from reading_rollups where (probe_id, metric::text, hour) in (select * from unnest($1::int[], $2::text[], $3::timestamptz[]))`, [
    cols(written.rollups, "probe_id"),
    cols(written.rollups, "metric"),
    cols(written.rollups, "hour"),
  ]);
  await c.query(`delete from readings where (probe_id, metric::text, ts) in (select * from unnest($1::int[], $2::text[], $3::timestamptz[]))`, [
    cols(written.readings, "probe_id"),
    cols(written.readings, "metric"),
    cols(written.readings, "ts"),
  ]);
  await c.end();
});

async function signedIn(errors: string[]): Promise<Page> {
  const page = await (await browser.newContext(PHONE)).newPage();
  page.on("pageerror", (e) => errors.push(e.message));
  page.on("console", (m) => void (m.type() === "error" && errors.push(m.text())));
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill("class5b@alder-row.example");
  await page.getByLabel("Password").fill("alder-row-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/farms\//);
  return page;
}

/** A finger put down on the plot at (x0, y) and dragged to x1, through Chromium's touch input. */
async function drag(page: Page, x0: number, x1: number, y: number) {
  const cdp = await page.context().newCDPSession(page);
  const point = (x: number) => [{ x, y, radiusX: 4, radiusY: 4, force: 1, id: 1 }];
  await cdp.send("Input.dispatchTouchEvent", { type: "touchStart", touchPoints: point(x0) });
  for (let k = 1; k <= 6; k++) await cdp.send("Input.dispatchTouchEvent", { type: "touchMove", touchPoints: point(x0 + ((x1 - x0) * k) / 6) });
  await cdp.send("Input.dispatchTouchEvent", { type: "touchEnd", touchPoints: [] });
  await cdp.detach();
}

describe("a zone's chart over a year", () => {
  it("1 year draws day points from a year ago to now, marks the logbook, and a finger reads it in the legend", async () => {
    expect(written.rollups.length).toBeGreaterThan(300 * 24);
    const errors: string[] = [];
    const page = await signedIn(errors);
    await page.goto(`${appUrl()}/farms/${place.farmId}/zones/${place.zoneId}`);
    const figure = page.locator('figure[data-metric="temperature"]');
    const plot = figure.locator('[role="img"]');
    await plot.locator("canvas").waitFor(SLOW);

    const answer = page.waitForResponse((res) => res.url().includes(`/api/zones/${place.zoneId}/series?metric=temperature&from=`), SLOW);
    await page.getByRole("group", { name: "Chart window" }).getByRole("button", { name: "1 year" }).click();
    const body = (await (await answer).json()) as {
      source: string;
      bucketSeconds: number;
      from: string;
      series: { t: number[] }[];
      events: { kind: string }[];
    };
    const clicked = Date.now();
    expect(body).toMatchObject({ source: "rollup", bucketSeconds: 86_400 });
    expect(Math.abs(Date.parse(body.from) - (clicked - 365 * DAY))).toBeLessThan(10 * 60_000);
    const t = body.series[0]!.t;
    // One point a day: the first day holds a year ago, the last is today.
    expect(t.length).toBeGreaterThanOrEqual(365);
    expect(t.length).toBeLessThanOrEqual(367);
    expect(Math.abs(t[0]! * 1000 - (clicked - 365 * DAY))).toBeLessThan(DAY + HOUR);
    expect(clicked - t.at(-1)! * 1000).toBeLessThan(DAY + HOUR);

    // The chart drew that answer: the caption names its buckets, the plot its points and span.
    await expect.poll(() => figure.locator("figcaption").textContent(), SLOW).toContain("daily means, low–high shaded");
    await expect.poll(() => plot.getAttribute("data-points"), SLOW).toBe(String(t.length));
    expect(Number(await plot.getAttribute("data-first-t"))).toBe(t[0]);
    expect(Number(await plot.getAttribute("data-last-t"))).toBe(t.at(-1));
    const label = (await plot.getAttribute("aria-label"))!;
    expect(label).toContain("Temperature, last 12 months: latest ");
    // The demo's own half year of logbook entries is marked too: the label counts what the answer holds,
    // and this test's entries (one of each kind, the shift the only one into this zone) are among them.
    const count = (kind: string) => body.events.filter((e) => e.kind === kind).length;
    const many = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;
    for (const kind of ["feeding", "watering", "shift", "harvest"]) expect(count(kind), kind).toBeGreaterThanOrEqual(1);
    expect(label).toContain(
      `${many(count("watering"), "watering")}, ${many(count("shift"), "shift")}, ${many(count("harvest"), "harvest")} and ${many(count("feeding"), "feeding")} marked`,
    );
    // A finger dragged along the middle of the plot, ending near the harvest 40 days ago.
    await figure.scrollIntoViewIfNeeded();
    const box = (await plot.boundingBox())!;
    const geo = await plot.evaluate((el) => {
      const d = (el as HTMLElement).dataset;
      return { left: Number(d.plotLeft), top: Number(d.plotTop), w: Number(d.plotWidth), h: Number(d.plotHeight) };
    });
    const xAt = (share: number) => box.x + geo.left + geo.w * share;
    const legend = figure.locator("[data-chart-legend]");
    await drag(page, xAt(0.3), xAt(1 - 40 / 365), box.y + geo.top + geo.h / 2);
    const row = (await legend.locator("[data-cursor-row]").first().textContent({ timeout: 5_000 })) ?? "";
    expect(await legend.locator("[data-cursor-when]").count()).toBe(1);
    const whenWords = (await legend.locator("[data-cursor-when]").textContent())!;
    // A day bucket says its day in the farm's zone: the harvest's, 40 days ago (give or take the bucket).
    expect(whenWords).toMatch(/^[A-Z][a-z]{2}, \d{1,2} [A-Z][a-z]{2} \d{4}$/);
    expect(Math.abs(Date.parse(`${whenWords.slice(5)} 12:00 UTC`) - (now - 40 * DAY))).toBeLessThan(2 * DAY);
    expect(row).toMatch(/^\d+\.\d °C\s*low \d+\.\d · high \d+\.\d$/);
    expect(await legend.locator('[data-cursor-mark="harvest"]').textContent()).toContain("harvest");
    expect(await legend.locator('[data-cursor-mark="harvest"]').textContent()).toContain("5.50 kg");
    // Large: the value reads at 24 px.
    expect(
      await legend
        .locator("[data-cursor-row] .text-2xl")
        .first()
        .evaluate((el) => getComputedStyle(el).fontSize),
    ).toBe("24px");
    await page.screenshot({ path: screenshotPath("year-chart-touch") });

    // New data arrives while the keeper reads (the chart refreshes every minute, or on coming back to
    // the page; here a day older than the demo's own half year changes): the plot is rebuilt, and the
    // legend stays on the moment the finger chose.
    const day = written.rollups.find((x) => x.metric === "temperature" && Math.abs(x.hour.getTime() - (now - 300 * DAY)) < 3_600_000)!;
    await c.query(`update reading_rollups set sum = sum + 6, max = max + 1 where probe_id = $1 and metric = 'temperature' and hour = $2`, [
      day.probe_id,
      day.hour,
    ]);
    await figure.locator(".uplot").evaluate((el) => el.setAttribute("data-before-refresh", ""));
    // Coming back to the page asks for the data again (SWR waits 5 s after the last time it asked).
    await expect
      .poll(
        async () => {
          await page.evaluate(() => window.dispatchEvent(new Event("focus")));
          return figure.locator(".uplot[data-before-refresh]").count();
        },
        { timeout: 30_000, interval: 1_000 },
      )
      .toBe(0);
    expect(await figure.locator(".uplot").count()).toBe(1);
    expect(await legend.locator("[data-cursor-when]").textContent()).toBe(whenWords);
    expect(await legend.locator('[data-cursor-mark="harvest"]').count()).toBe(1);

    // Every zone of the bin on one chart, over the year too.
    const bin = page.locator("figure[data-bin-chart]");
    await bin.scrollIntoViewIfNeeded();
    await bin.getByRole("group", { name: "Window for all zones" }).getByRole("button", { name: "1 year" }).click();
    const binPlot = bin.locator('[role="img"]');
    await expect.poll(() => binPlot.getAttribute("data-bucket-seconds"), SLOW).toBe("86400");
    expect(await binPlot.getAttribute("data-lines")).toBe("3");
    expect(await binPlot.getAttribute("aria-label")).toMatch(
      /^Temperature of every zone, last 12 months: Fresh zone solid line.*Working zone dashed line, newest/,
    );
    const bbox = (await binPlot.boundingBox())!;
    await drag(page, bbox.x + bbox.width * 0.5, bbox.x + bbox.width * 0.7, bbox.y + bbox.height * 0.45);
    await expect.poll(() => bin.locator("[data-cursor-row]").count()).toBe(3);
    expect(await bin.locator("[data-cursor-row]").nth(1).textContent()).toMatch(/^Working zone\s*\d+\.\d °C$/);
    await bin.scrollIntoViewIfNeeded();
    await page.screenshot({ path: screenshotPath("year-chart-bin") });
    expect(errors).toEqual([]);
    await page.context().close();
  });
});
