// What a phone downloads and how soon it paints, printed, never asserted: `npm run bench pages`, or
// `WORMWARD_TEST_CLUSTER=pg-bench-pages WORMWARD_TEST_PG_PORT=54368 npx tsx tests/bench/pages.bench.ts`.
// Builds the app when its sources changed since the last build, starts the test harness's throwaway
// cluster (the demo farm seeded) and `next start` on a free port, signs in as the demo keeper, then
// opens Today, a bin page and a zone page in headless Chromium at 390×844 with the CPU slowed 4×
// (DevTools' Emulation.setCPUThrottlingRate, the usual stand-in for a mid-range phone), each in a
// fresh context (no cache, no service worker), several times:
// - JavaScript: the compressed bytes of every script the opening fetches (Resource Timing's
//   encodedBodySize: the body as sent with the browser's Accept-Encoding, before decompression),
//   until the network has been quiet for 500 ms after the load event, so a chunk loaded lazily
//   by what the page shows counts too. 1 kB = 1,000 bytes.
// - LCP: the last largest-contentful-paint entry's startTime, from navigation start.
import { spawnSync } from "node:child_process";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { chromium, type Browser } from "playwright-core";
import { buildUnlessCurrent } from "@/lib/stack/build-cache";
import setup from "../setup/global";
import { PHONE } from "../helpers/browser";
import { record, type Row } from "./report";

const root = path.resolve(import.meta.dirname, "../..");
const RUNS = Number(process.env.PAGES_BENCH_RUNS ?? 5);
const CPU_SLOWDOWN = 4;
// Issue 14's targets for Today.
const TODAY_JS_TARGET_KB = 120;
const TODAY_LCP_TARGET_MS = 800;

type Opening = {
  jsBytes: number;
  scripts: { url: string; bytes: number; encoding: string | null }[];
  lcpMs: number | null;
  /** What the LCP waited for: the document's first byte, and the first paint. */
  firstByteMs: number;
  /** The document's last byte: a page streamed behind its loading.tsx ends after its data is read. */
  lastByteMs: number;
  fcpMs: number | null;
  lcpElement: string | null;
};

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length === 0 ? null : s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};

async function open(browser: Browser, storageState: string, url: string, throttle: boolean): Promise<Opening> {
  const context = await browser.newContext({ ...PHONE, storageState: JSON.parse(storageState), serviceWorkers: "block" });
  const page = await context.newPage();
  const encodings = new Map<string, string | null>();
  page.on("response", (r) => {
    if (r.request().resourceType() === "script") void r.headerValue("content-encoding").then((e) => encodings.set(r.url(), e));
  });
  if (throttle) {
    const cdp = await context.newCDPSession(page);
    await cdp.send("Emulation.setCPUThrottlingRate", { rate: CPU_SLOWDOWN });
  }
  const res = await page.goto(url, { waitUntil: "load", timeout: 120_000 });
  if (!res || res.status() !== 200 || new URL(page.url()).pathname !== new URL(url).pathname) {
    throw new Error(`${url} answered ${res?.status()} at ${page.url()}: not signed in, or the page is missing`);
  }
  await page.waitForLoadState("networkidle", { timeout: 60_000 }).catch(() => undefined);
  const { scripts, lcp, lcpElement, firstByte, lastByte, fcp } = await page.evaluate(async () => {
    const scripts = performance
      .getEntriesByType("resource")
      .map((e) => e as PerformanceResourceTiming)
      .filter((e) => e.initiatorType === "script" || new URL(e.name).pathname.endsWith(".js"))
      .map((e) => ({ url: e.name, bytes: e.encodedBodySize }));
    type Lcp = PerformanceEntry & { element?: Element | null };
    const last = await new Promise<Lcp | null>((resolve) => {
      new PerformanceObserver((list) => resolve((list.getEntries().at(-1) as Lcp | undefined) ?? null)).observe({
        type: "largest-contentful-paint",
        buffered: true,
      });
      setTimeout(() => resolve(null), 2000);
    });
    const el = last?.element;
    const lcpElement = el ? `${el.tagName.toLowerCase()} "${(el.textContent ?? "").trim().slice(0, 40)}"` : null;
    const nav = performance.getEntriesByType("navigation")[0] as PerformanceNavigationTiming;
    const [firstByte, lastByte] = [nav.responseStart, nav.responseEnd];
    const fcp = performance.getEntriesByName("first-contentful-paint")[0]?.startTime ?? null;
    return { scripts, lcp: last?.startTime ?? null, lcpElement, firstByte, lastByte, fcp };
  });
  await context.close();
  return {
    jsBytes: scripts.reduce((a, s) => a + s.bytes, 0),
    scripts: scripts.map((s) => ({ ...s, encoding: encodings.get(s.url) ?? null })),
    lcpMs: lcp,
    firstByteMs: firstByte,
    lastByteMs: lastByte,
    fcpMs: fcp,
    lcpElement,
  };
}

async function main() {
  const built = buildUnlessCurrent(root, () => {
    console.log("Building the web app (next build)…");
    const r = spawnSync(path.join(root, "node_modules", ".bin", "next"), ["build"], {
      cwd: root,
      stdio: "inherit",
      env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" },
    });
    if (r.status !== 0) throw new Error("next build failed");
  });
  console.log(`Web app: ${built === "reused" ? "the last build is current" : "built just now"}.`);
  const provided: Record<string, unknown> = {};
  const teardown = await setup({ provide: (k: string, v: unknown) => (provided[k] = v) } as never);
  let browser: Browser | null = null;
  try {
    const appUrl = provided.appUrl as string | null;
    if (!appUrl) throw new Error("The app did not start: no .next build.");
    const db = new pg.Client({ connectionString: provided.appDbUrl as string });
    await db.connect();
    const farm = (await db.query(`select id from farms where name = 'Alder Row Worm Farm' order by created_at limit 1`)).rows[0].id as string;
    // The bin with the most zones, and its first zone: the heaviest bin and zone pages of the demo.
    const zone = (
      await db.query(
        `select z.id, z.bin_id from zones z join bins b on b.id = z.bin_id where b.farm_id = $1
         order by (select count(*) from zones z2 where z2.bin_id = b.id) desc, b.name, z.position limit 1`,
        [farm],
      )
    ).rows[0] as { id: string; bin_id: string };
    await db.end();
    const pages = { today: `/farms/${farm}`, bin: `/farms/${farm}/bins/${zone.bin_id}`, zone: `/farms/${farm}/zones/${zone.id}` };

    browser = await chromium.launch({
      executablePath: "/usr/bin/chromium",
      headless: true,
      args: ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run"],
    });
    const signIn = await browser.newContext({ ...PHONE, serviceWorkers: "block" });
    const p = await signIn.newPage();
    await p.goto(`${appUrl}/sign-in`);
    await p.getByLabel("E-mail").fill("tomas@alder-row.example"); // the demo keeper (db/seed.ts)
    await p.getByLabel("Password").fill("alder-row-demo");
    await p.getByRole("button", { name: "Sign in" }).click();
    await p.waitForURL(/\/farms\//);
    const storageState = JSON.stringify(await signIn.storageState());
    await signIn.close();

    console.log(
      `load average ${os
        .loadavg()
        .map((l) => l.toFixed(1))
        .join(" ")} on ${os.cpus().length} cores; ${RUNS} openings a page at ${CPU_SLOWDOWN}× CPU slowdown, each after one unmeasured opening`,
    );
    const figures: Record<string, number | null> = {};
    const rows: Row[] = [];
    for (const [name, route] of Object.entries(pages)) {
      await open(browser, storageState, appUrl + route, false); // the server's first render of the route
      const runs: Opening[] = [];
      for (let i = 0; i < RUNS; i++) runs.push(await open(browser, storageState, appUrl + route, true));
      const kb = median(runs.map((r) => r.jsBytes))! / 1000;
      const lcps = runs.map((r) => r.lcpMs).filter((x): x is number => x != null);
      const lcp = median(lcps);
      const last = runs.at(-1)!;
      const plain = last.scripts.filter((s) => !s.encoding).length;
      console.log(
        `${name.padEnd(5)} ${kb.toFixed(1)} kB of JavaScript in ${last.scripts.length} scripts${plain ? ` (${plain} sent uncompressed)` : ", all compressed"}; ` +
          `LCP median ${lcp == null ? "—" : Math.round(lcp)} ms (${lcps.map((x) => Math.round(x)).join(", ")})`,
      );
      const ms = (x: number | null) => (x == null ? "—" : `${Math.round(x)} ms`);
      console.log(
        `      document's first byte ${ms(median(runs.map((r) => r.firstByteMs)))}, last byte ${ms(median(runs.map((r) => r.lastByteMs)))}, first paint ${ms(median(runs.flatMap((r) => (r.fcpMs == null ? [] : [r.fcpMs]))))}, largest: ${last.lcpElement ?? "—"}`,
      );
      for (const s of [...last.scripts].sort((a, b) => b.bytes - a.bytes).slice(0, 8)) {
        console.log(`        ${(s.bytes / 1000).toFixed(1).padStart(6)} kB ${s.encoding ?? "identity"}  ${new URL(s.url).pathname}`);
      }
      figures[`${name}_js_kb`] = kb;
      figures[`${name}_js_scripts`] = last.scripts.length;
      figures[`${name}_lcp_ms`] = lcp;
      figures[`${name}_first_byte_ms`] = median(runs.map((r) => r.firstByteMs));
      const label = name === "today" ? "Today" : `a ${name} page`;
      rows.push({ what: `first-load JS, ${label} (compressed)`, value: kb, unit: "kB", target: name === "today" ? `≤ ${TODAY_JS_TARGET_KB} kB` : undefined });
      rows.push({ what: `LCP, ${label}, ${CPU_SLOWDOWN}× CPU`, value: lcp, unit: "ms", target: name === "today" ? `≤ ${TODAY_LCP_TARGET_MS} ms` : undefined });
    }
    record(figures, rows);
  } finally {
    await browser?.close();
    await teardown();
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
