// How long a page opened before takes to open again on a weak signal, printed, never asserted:
// `WORMWARD_TEST_CLUSTER=pg-bench-offline WORMWARD_TEST_PG_PORT=54367 npx tsx tests/bench/offline-open.bench.ts`
// (after `npx next build`). Starts the test harness's cluster and app, signs in as the demo keeper,
// opens Today, a bin and a zone once at full speed so the service worker keeps them, then opens each
// again through a shaping proxy at 400 kbit/s with 400 ms round-trip latency, the weak signal a user
// measured in a basement. The proxy slows everything, the service worker's own requests included
// (DevTools' Network.emulateNetworkConditions on a page does not reach its worker). For comparison,
// the same pages with no service worker (the phone as it was before), and with the phone offline.
import net from "node:net";
import os from "node:os";
import pg from "pg";
import { chromium, type BrowserContext } from "playwright-core";
import setup from "../setup/global";
import { PHONE } from "../helpers/browser";

const KBIT_S = 400;
const RTT_MS = 400;
const RUNS = 3;

/** A TCP proxy that delays each chunk by half the round trip and meters it at KBIT_S, each way. */
function shapingProxy(target: { host: string; port: number }) {
  let shaping = false;
  const pipe = (from: net.Socket, to: net.Socket) => {
    let free = 0;
    from.on("data", (chunk: Buffer) => {
      if (!shaping) return void to.write(chunk);
      const now = Date.now();
      const start = Math.max(now + RTT_MS / 2, free);
      free = start + (chunk.length * 8) / KBIT_S; // bits / (kbit/s) = ms
      from.pause();
      setTimeout(() => {
        to.write(chunk);
        from.resume();
      }, free - now);
    });
    from.on("end", () => setTimeout(() => to.end(), Math.max(0, free - Date.now())));
    from.on("error", () => to.destroy());
  };
  const server = net.createServer((client) => {
    const up = net.connect(target.port, target.host);
    pipe(client, up);
    pipe(up, client);
  });
  return {
    listen: () => new Promise<number>((r) => server.listen(0, "127.0.0.1", () => r((server.address() as net.AddressInfo).port))),
    set: (on: boolean) => (shaping = on),
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}

async function main() {
  const provided: Record<string, unknown> = {};
  const teardown = await setup({ provide: (k: string, v: unknown) => (provided[k] = v) } as never);
  const appUrl = provided.appUrl as string | null;
  if (!appUrl) throw new Error("The app is not built: run `NEXT_TELEMETRY_DISABLED=1 npx next build` first.");
  const db = new pg.Client({ connectionString: provided.appDbUrl as string });
  await db.connect();
  const farm = (await db.query(`select id from farms where name = 'Alder Row Worm Farm' order by created_at limit 1`)).rows[0].id as string;
  const zone = (
    await db.query(`select z.id, z.bin_id from zones z join bins b on b.id = z.bin_id where b.farm_id = $1 order by b.name, z.position limit 1`, [farm])
  ).rows[0] as { id: string; bin_id: string };
  await db.end();

  const app = new URL(appUrl);
  const proxy = shapingProxy({ host: app.hostname, port: Number(app.port) });
  const origin = `http://127.0.0.1:${await proxy.listen()}`;
  const pages = { Today: `/farms/${farm}`, bin: `/farms/${farm}/bins/${zone.bin_id}`, zone: `/farms/${farm}/zones/${zone.id}` };
  const browser = await chromium.launch({
    executablePath: "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run"],
  });

  async function signedIn(serviceWorkers: "allow" | "block") {
    const context = await browser.newContext({ ...PHONE, serviceWorkers });
    const page = await context.newPage();
    await page.goto(`${origin}/sign-in`);
    await page.getByLabel("E-mail").fill("tomas@alder-row.example");
    await page.getByLabel("Password").fill("alder-row-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/farms\//);
    if (serviceWorkers === "allow") {
      await page.evaluate(async () => {
        await navigator.serviceWorker.ready;
        if (!navigator.serviceWorker.controller) await new Promise((r) => navigator.serviceWorker.addEventListener("controllerchange", r, { once: true }));
      });
    }
    for (const p of Object.values(pages)) await page.goto(origin + p, { waitUntil: "load" });
    await page.waitForTimeout(1000); // the worker's copies are written after the answers
    return { context, page };
  }

  /** Milliseconds from asking for the page to its first paint of the board and the page's load event. */
  async function open(context: BrowserContext, path: string) {
    const page = await context.newPage();
    const t0 = performance.now();
    await page.goto(origin + path, { waitUntil: "domcontentloaded", timeout: 60_000 });
    const shown = performance.now() - t0;
    await page.waitForLoadState("load", { timeout: 60_000 }).catch(() => undefined);
    const loaded = performance.now() - t0;
    // When the document's first byte came (from the network or the worker), apart from parsing it.
    const answered = await page.evaluate(() => (performance.getEntriesByType("navigation")[0] as PerformanceNavigationTiming).responseStart);
    const banner = await page
      .getByText("Offline — values from")
      .isVisible()
      .catch(() => false);
    await page.close();
    return { shown, loaded, answered, banner };
  }

  const fmt = (n: number) => `${(n / 1000).toFixed(2)} s`;
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
  console.log(
    `load average ${os
      .loadavg()
      .map((l) => l.toFixed(1))
      .join(" ")} on ${os.cpus().length} cores`,
  );
  console.log(
    `weak signal: ${KBIT_S} kbit/s each way, ${RTT_MS} ms round trip; median of ${RUNS} opens (first byte of the page / document shown / load event)`,
  );
  for (const sw of ["block", "allow"] as const) {
    const { context } = await signedIn(sw);
    proxy.set(true);
    for (const [name, path] of Object.entries(pages)) {
      const runs = [];
      for (let i = 0; i < RUNS; i++) runs.push(await open(context, path));
      console.log(
        `${sw === "allow" ? "with the service worker   " : "without a service worker  "} ${name.padEnd(5)}  answered ${fmt(median(runs.map((r) => r.answered)))}  shown ${fmt(median(runs.map((r) => r.shown)))}  loaded ${fmt(median(runs.map((r) => r.loaded)))}${runs.some((r) => r.banner) ? "  (from the phone, with the banner)" : ""}`,
      );
    }
    if (sw === "allow") {
      await context.setOffline(true);
      const r = await open(context, pages.bin);
      console.log(
        `offline, with the service worker  bin    answered ${fmt(r.answered)}  shown ${fmt(r.shown)}  loaded ${fmt(r.loaded)}${r.banner ? "  (from the phone, with the banner)" : ""}`,
      );
    }
    proxy.set(false);
    await context.close();
  }
  await browser.close();
  await proxy.close();
  await teardown();
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
