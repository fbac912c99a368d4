// The launcher behind `npm start`, `npm test` and `npm run bench`.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { buildUnlessCurrent } from "./build-cache";
import { ensureOsPackages } from "./os-packages";
import { loadSecrets } from "./secrets";

const root = path.resolve(import.meta.dirname, "../..");
const dataDir = path.join(root, ".data");
const bin = (name: string) => path.join(root, "node_modules", ".bin", name);
const children: ChildProcess[] = [];

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env) {
  const r = spawnSync(cmd, args, { cwd: root, stdio: "inherit", env });
  if (r.status !== 0) throw new Error(`${path.basename(cmd)} ${args.join(" ")} exited with ${r.status}`);
}

function service(name: string, cmd: string, args: string[], env: NodeJS.ProcessEnv) {
  const logFile = fs.openSync(path.join(dataDir, `${name}.log`), "a");
  const child = spawn(cmd, args, { cwd: root, env, stdio: ["ignore", logFile, logFile] });
  child.on("exit", (code, signal) => {
    if (!shuttingDown) console.error(`[${name}] stopped (${signal ?? code}); see .data/${name}.log`);
  });
  children.push(child);
  return child;
}

let shuttingDown = false;
function shutdown(stopDb: boolean) {
  if (shuttingDown) return;
  shuttingDown = true;
  console.log("\nStopping Wormward…");
  for (const c of children) c.kill("SIGTERM");
  if (stopDb && !process.env.DATABASE_URL) stopCluster("pg");
  process.exit(0);
}

async function waitForHttp(url: string, timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    try {
      const r = await fetch(url);
      if (r.status < 500) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${url} did not answer within ${timeoutMs / 1000} s`);
}

const exists = (rel: string) => fs.existsSync(path.join(root, rel));

async function start() {
  const startedAt = Date.now();
  ensureOsPackages(["openssl"]);
  fs.mkdirSync(dataDir, { recursive: true });
  let databaseUrl = process.env.DATABASE_URL;
  const ownCluster = !databaseUrl;
  if (!databaseUrl) {
    const c = await startCluster({ name: "pg" });
    databaseUrl = c.url;
    console.log(`PostgreSQL: 127.0.0.1:${c.port}${c.note ? ` (${c.note})` : ""}`);
  }
  await runMigrations(databaseUrl);
  const { seedForStart, seedSummary } = await import("./seed-demo");
  const seedStarted = performance.now();
  const seed = await seedForStart(databaseUrl, path.join(dataDir, "demo-probes.json"), { ownCluster, flag: process.env.WORMWARD_DEMO });
  const { demo, seeded } = seed;
  console.log(`${seedSummary(seed)}${seeded ? "" : ` (checked in ${((performance.now() - seedStarted) / 1000).toFixed(1)} s)`}`);

  const secrets = loadSecrets(dataDir);
  const port = Number(process.env.PORT ?? 3000);
  const appUrl = `http://127.0.0.1:${port}`;
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "production",
    DATABASE_URL: databaseUrl,
    NEXTAUTH_SECRET: secrets.nextauthSecret,
    NEXTAUTH_URL: appUrl,
    APP_URL: appUrl,
    VAPID_PUBLIC_KEY: secrets.vapidPublicKey,
    VAPID_PRIVATE_KEY: secrets.vapidPrivateKey,
    MQTT_PORT: process.env.MQTT_PORT ?? "18830",
    SMTP_PORT: process.env.SMTP_PORT ?? "2525",
    // What the connect snippets of the probes page show; set them to this machine's network name for probes elsewhere.
    PUBLIC_MQTT_URL: process.env.PUBLIC_MQTT_URL ?? `mqtt://127.0.0.1:${process.env.MQTT_PORT ?? "18830"}`,
    PUBLIC_INGEST_URL: process.env.PUBLIC_INGEST_URL ?? `${appUrl}/api/ingest`,
    PUSH_CA_FILE: path.join(dataDir, "push-ca.pem"),
    // The fake push service below is the only push service on loopback the app may send to.
    PUSH_FAKE_ORIGIN: "https://127.0.0.1:4431",
    DEBUG: process.env.DEBUG ?? "wormward:*",
  };

  const lines: string[] = [];
  if (exists("fakes/push-service.ts")) {
    service("fake-push", bin("tsx"), ["fakes/push-service.ts", "--port", "4431", "--ca-file", env.PUSH_CA_FILE!], env);
    lines.push("Fake push service: https://127.0.0.1:4431/messages");
  }
  if (exists("fakes/mailbox.ts")) {
    service("mailbox", bin("tsx"), ["fakes/mailbox.ts", "--smtp-port", env.SMTP_PORT!, "--http-port", "8025"], env);
    lines.push("Fake mailbox: http://127.0.0.1:8025/");
  }
  if (exists("ingest/main.ts")) {
    service("ingest", bin("tsx"), ["ingest/main.ts"], env);
    lines.push(`MQTT broker (ingest): mqtt://127.0.0.1:${env.MQTT_PORT}`);
  }
  // The simulated probes are the demo farm's; without the demo they have nothing to report to.
  if (demo && exists("fakes/probe-fleet.ts")) {
    service("probe-fleet", bin("tsx"), ["fakes/probe-fleet.ts", "--probes", path.join(dataDir, "demo-probes.json"), "--control-port", "8099"], env);
    lines.push("Simulated probes: the demo farm's probes report every minute. Start a heavy feed in Long Bed North's fresh zone:");
    lines.push(`  curl -X POST http://127.0.0.1:8099/scenario -H 'content-type: application/json' -d '{"code":"alder-01","scenario":"heavy-feed"}'`);
  }

  // process.uptime(): since the launcher's own start, so a restart's cost before the build shows.
  console.log(`Ready for the web app ${process.uptime().toFixed(1)} s after start.`);
  const built = buildUnlessCurrent(root, () => {
    console.log("Building the web app (next build)…");
    run(bin("next"), ["build"], { ...env, NEXT_TELEMETRY_DISABLED: "1" });
  });
  if (built === "reused") console.log("Web app: sources unchanged since the last build, reusing it.");
  service("web", bin("next"), ["start", "-H", "127.0.0.1", "-p", String(port)], { ...env, NEXT_TELEMETRY_DISABLED: "1" });
  await waitForHttp(`${appUrl}/sign-in`);

  const { DEMO_PEOPLE, DEMO_PASSWORD } = await import("@/db/seed");
  const signIns = demo
    ? `${DEMO_PEOPLE.map((p) => `  ${p.role.padEnd(7)} ${p.email.padEnd(28)} password: ${DEMO_PASSWORD}`).join("\n")}
${seeded ? "  (demo farm seeded just now)" : "  (existing data kept; demo sign-ins work unless you changed them)"}`
    : `  No demo sign-in here: the demo people are seeded only on npm start's own database, or into
  DATABASE_URL's with WORMWARD_DEMO=1. To make the first owner (password on standard input):
    DATABASE_URL=… npx tsx lib/stack/add-owner.ts <e-mail> "<your name>" "<farm name>"`;
  console.log(`
Wormward is running.  Sign in at ${appUrl}/sign-in
${signIns}
${lines.map((l) => `  ${l}`).join("\n")}
Up in ${((Date.now() - startedAt) / 1000).toFixed(1)} s (web build ${built}).
Logs are in .data/*.log. Press Ctrl-C to stop.`);
  process.on("SIGINT", () => shutdown(true));
  process.on("SIGTERM", () => shutdown(true));
}

async function test(extra: string[]) {
  ensureOsPackages(["chromium", "mosquitto-clients", "openssl"]);
  fs.mkdirSync(dataDir, { recursive: true });
  console.log("Linting (eslint) and checking the format (prettier)…");
  run(bin("eslint"), [".", "--max-warnings", "0"]);
  run(bin("prettier"), ["--check", "--log-level", "warn", "."]);
  console.log("Type-checking the whole repository (tsc --noEmit)…");
  run(bin("tsc"), ["--noEmit", "-p", "tsconfig.json"]);
  // The type check above is the build's own, so the build skips it; its output is the same as npm start's.
  const built = buildUnlessCurrent(root, () => {
    console.log("Building the web app for the browser and API tests (next build)…");
    run(bin("next"), ["build"], { ...process.env, NEXT_TELEMETRY_DISABLED: "1", WORMWARD_TYPECHECKED: "1" });
  });
  if (built === "reused") console.log("Web app: sources unchanged since the last build, reusing it.");
  const results = path.join(dataDir, "test-results.json");
  const r = spawnSync(bin("vitest"), ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${results}`, ...extra], {
    cwd: root,
    stdio: "inherit",
    env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" },
  });
  process.exit(r.status ?? 1);
}

// `npm run bench [name…]`: every benchmark (or the named ones) one after the other, each on its own
// throwaway services; at the end one table and `.data/bench/latest.json`. Nothing here fails the build
// on a figure: a bench file that crashes is reported and the others still run.
const BENCHES: Record<string, string> = {
  ingest: "tests/bench/ingest.bench.ts",
  preview: "tests/bench/preview.bench.ts",
  series: "tests/bench/series.bench.ts",
};
async function bench(names: string[]) {
  ensureOsPackages(["openssl", "chromium"]);
  const { beginRun, table, LATEST } = await import("@/tests/bench/report");
  const chosen = names.length ? names : Object.keys(BENCHES).filter((n) => n !== "soak");
  for (const n of chosen) if (!BENCHES[n]) throw new Error(`unknown bench ${n}; there are: ${Object.keys(BENCHES).join(", ")}`);
  beginRun();
  const failed: string[] = [];
  for (const n of chosen) {
    const file = BENCHES[n]!;
    if (!exists(file)) throw new Error(`${file} is missing`);
    const r = spawnSync(bin("tsx"), [file], { cwd: root, stdio: "inherit", env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" } });
    if (r.status !== 0) failed.push(n);
  }
  console.log(`\n${table()}\n\nFigures: ${path.relative(root, LATEST)}`);
  if (failed.length) console.log(`These benchmarks stopped before the end: ${failed.join(", ")}`);
}

const [cmd = "start", ...rest] = process.argv.slice(2);
try {
  if (cmd === "start") await start();
  else if (cmd === "test") await test(rest);
  else if (cmd === "bench") await bench(rest);
  else throw new Error(`unknown command ${cmd}`);
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  for (const c of children) c.kill("SIGTERM");
  process.exit(1);
}
