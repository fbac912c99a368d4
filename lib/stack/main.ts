// The launcher behind `npm start`, `npm test` and `npm run bench`.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { startCluster, startReplica, stopCluster, type Cluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { buildUnlessCurrent } from "./build-cache";
import { startHaproxy, stopHaproxy } from "./haproxy";
import { ensureOsPackages } from "./os-packages";
import { startRedis, stopRedis } from "./redis-server";
import { loadSecrets } from "./secrets";
import { supervise, watchCluster, type ClusterWatch, type Supervised } from "./supervise";

const root = path.resolve(import.meta.dirname, "../..");
const dataDir = path.join(root, ".data");
const bin = (name: string) => path.join(root, "node_modules", ".bin", name);
const children: Supervised[] = [];
let clusterWatch: ClusterWatch | null = null;

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env) {
  const r = spawnSync(cmd, args, { cwd: root, stdio: "inherit", env });
  if (r.status !== 0) throw new Error(`${path.basename(cmd)} ${args.join(" ")} exited with ${r.status}`);
}

// A service the launcher keeps running: one that dies unexpectedly is started again after a
// back-off (lib/stack/supervise.ts), its output appended to .data/<name>.log.
function service(name: string, cmd: string, args: string[], env: NodeJS.ProcessEnv) {
  // `tsx file` runs the file in a second node process; `node --import tsx file` in one, so the
  // supervisor watches (and a kill hits) the service itself, and no orphan keeps its port.
  const viaNode = cmd === bin("tsx");
  const child = supervise({
    name,
    cmd: viaNode ? process.execPath : cmd,
    args: viaNode ? ["--import", "tsx", ...args] : args,
    env,
    cwd: root,
    logFile: path.join(dataDir, `${name}.log`),
    onExit: ({ code, signal, restartInMs }) => {
      if (!shuttingDown) console.error(`[${name}] stopped (${signal ?? code}); starting it again in ${restartInMs} ms; see .data/${name}.log`);
    },
  });
  children.push(child);
  return child;
}

let shuttingDown = false;
// Servers started for --nodes (HAProxy, Redis), stopped before the database.
const stopAlso: (() => void)[] = [];
// HAProxy and Redis (multi-node layout) stop after the services that use them.
function stopExtras() {
  for (const stop of stopAlso) {
    try {
      stop();
    } catch (err) {
      console.error((err as Error).message);
    }
  }
}

function shutdown(stopDb: boolean) {
  if (shuttingDown) return;
  shuttingDown = true;
  console.log("\nStopping Wormward…");
  clusterWatch?.stop();
  void Promise.all(children.map((c) => c.stop())).then(() => {
    stopExtras();
    if (stopDb && !process.env.DATABASE_URL) stopCluster("pg");
    process.exit(0);
  });
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

// `npm start -- --nodes N`: N ingest nodes sharing through Redis behind HAProxy (README, "Beyond one machine").
function nodeCount(args: string[]): number {
  const i = args.indexOf("--nodes");
  if (i < 0) return 1;
  const n = Number(args[i + 1]);
  if (!Number.isInteger(n) || n < 1 || n > 16) throw new Error("--nodes takes a whole number from 1 to 16");
  return n;
}

// The read replica of the multi-node layout: a hot standby of our own cluster (pg_basebackup -R,
// db/local-pg.ts startReplica). With an outside DATABASE_URL there is no primary of ours to copy.
async function startReadReplica(primary: Cluster | null): Promise<string | null> {
  if (!primary) return null;
  const r = await startReplica({ name: "pg-replica", primary });
  stopAlso.push(() => stopCluster("pg-replica"));
  return r.url;
}

async function start(args: string[]) {
  const startedAt = Date.now();
  const nodes = nodeCount(args);
  ensureOsPackages(["openssl"]);
  fs.mkdirSync(dataDir, { recursive: true });
  let databaseUrl = process.env.DATABASE_URL;
  const ownCluster = !databaseUrl;
  let primary: Cluster | null = null;
  if (!databaseUrl) {
    const c = await startCluster({ name: "pg" });
    primary = c;
    databaseUrl = c.url;
    console.log(`PostgreSQL: 127.0.0.1:${c.port}${c.note ? ` (${c.note})` : ""}`);
    // Our own cluster is started again when its postmaster dies (the services reconnect by themselves).
    clusterWatch = watchCluster(c, "pg", {
      onRestart: (ms) => console.error(`[postgres] its postmaster had stopped; started it again in ${ms} ms`),
      onError: (err) => console.error(`[postgres] not started again yet: ${err.message.split("\n")[0]}`),
    });
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
  // Every port can be moved by the environment, so a second launcher (a benchmark) runs beside `npm start`.
  const [pushPort, mailboxHttpPort, fleetPort] = [
    process.env.PUSH_PORT ?? "4431",
    process.env.MAILBOX_HTTP_PORT ?? "8025",
    process.env.FLEET_CONTROL_PORT ?? "8099",
  ];
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
    PUSH_CA_FILE: process.env.PUSH_CA_FILE ?? path.join(dataDir, "push-ca.pem"),
    // The fake push service below is the only push service on loopback the app may send to.
    PUSH_FAKE_ORIGIN: `https://127.0.0.1:${pushPort}`,
    DEBUG: process.env.DEBUG ?? "wormward:*",
  };

  const lines: string[] = [];
  if (exists("fakes/push-service.ts")) {
    service("fake-push", bin("tsx"), ["fakes/push-service.ts", "--port", pushPort, "--ca-file", env.PUSH_CA_FILE!], env);
    lines.push(`Fake push service: https://127.0.0.1:${pushPort}/messages`);
  }
  if (exists("fakes/mailbox.ts")) {
    service("mailbox", bin("tsx"), ["fakes/mailbox.ts", "--smtp-port", env.SMTP_PORT!, "--http-port", mailboxHttpPort], env);
    lines.push(`Fake mailbox: http://127.0.0.1:${mailboxHttpPort}/`);
  }
  if (exists("ingest/main.ts") && nodes === 1) {
    service("ingest", bin("tsx"), ["ingest/main.ts"], env);
    lines.push(`MQTT broker (ingest): mqtt://127.0.0.1:${env.MQTT_PORT}`);
  } else if (exists("ingest/main.ts")) {
    const redis = await startRedis({ name: "redis" });
    stopAlso.unshift(() => stopRedis("redis"));
    const front = Number(env.MQTT_PORT);
    const backends = Array.from({ length: nodes }, (_, i) => ({ name: `ingest-${i + 1}`, port: front + 1 + i }));
    for (const b of backends)
      service(b.name, bin("tsx"), ["ingest/main.ts"], { ...env, MQTT_PORT: String(b.port), REDIS_URL: redis.url, MQTT_PROXY_PROTOCOL: "1" });
    const statsPort = Number(process.env.HAPROXY_STATS_PORT ?? 8404);
    await startHaproxy({ name: "haproxy", port: front, backends, statsPort, sendProxy: true });
    stopAlso.unshift(() => stopHaproxy("haproxy"));
    lines.push(
      `MQTT (HAProxy, TCP): mqtt://127.0.0.1:${front} → ${backends.map((b) => `${b.name} on ${b.port}`).join(", ")}; its stats at http://127.0.0.1:${statsPort}/`,
    );
    lines.push(`Redis (sessions, fan-out, probe presence): 127.0.0.1:${redis.port}, data in .data/redis/`);
    const replicaUrl = await startReadReplica(primary);
    if (replicaUrl) env.DATABASE_REPLICA_URL = replicaUrl;
    lines.push(
      replicaUrl
        ? `PostgreSQL read replica: ${new URL(replicaUrl).host}`
        : "PostgreSQL read replica: none (DATABASE_URL is not a cluster of ours, so there is nothing to copy)",
    );
  }
  // The simulated probes are the demo farm's; without the demo they have nothing to report to.
  if (demo && exists("fakes/probe-fleet.ts")) {
    service("probe-fleet", bin("tsx"), ["fakes/probe-fleet.ts", "--probes", path.join(dataDir, "demo-probes.json"), "--control-port", fleetPort], env);
    lines.push("Simulated probes: the demo farm's probes report every minute. Start a heavy feed in Long Bed North's fresh zone:");
    lines.push(`  curl -X POST http://127.0.0.1:${fleetPort}/scenario -H 'content-type: application/json' -d '{"code":"alder-01","scenario":"heavy-feed"}'`);
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

// `npm run test:faults`: the fault suite alone (tests/faults: kill -9 of the broker, the web app, the
// rule runner and PostgreSQL under a load of probes). It needs the built web app, which it restarts,
// and openssl for the fake push service; the harness's own app database gets 2 demo days, as the
// suite runs on a cluster of its own. `npm test` runs it with everything else.
async function faults(extra: string[]) {
  ensureOsPackages(["openssl"]);
  fs.mkdirSync(dataDir, { recursive: true });
  const built = buildUnlessCurrent(root, () => {
    console.log("Building the web app the suite kills and restarts (next build)…");
    run(bin("next"), ["build"], { ...process.env, NEXT_TELEMETRY_DISABLED: "1" });
  });
  if (built === "reused") console.log("Web app: sources unchanged since the last build, reusing it.");
  const r = spawnSync(bin("vitest"), ["run", "tests/faults", ...extra], {
    cwd: root,
    stdio: "inherit",
    env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1", WORMWARD_TEST_DEMO_DAYS: process.env.WORMWARD_TEST_DEMO_DAYS ?? "2" },
  });
  process.exit(r.status ?? 1);
}

// `npm run bench [name…]`: every benchmark (or the named ones) one after the other, each on its own
// throwaway services; at the end one table and `.data/bench/latest.json`. Nothing here fails the build
// on a figure: a bench file that crashes is reported and the others still run.
const BENCHES: Record<string, string> = {
  ingest: "tests/bench/ingest.bench.ts",
  preview: "tests/bench/preview.bench.ts",
  push: "tests/bench/push.bench.ts",
  series: "tests/bench/series.bench.ts",
  pages: "tests/bench/pages.bench.ts",
  restart: "tests/bench/restart.bench.ts",
  soak: "tests/bench/soak.bench.ts",
};
async function bench(names: string[]) {
  ensureOsPackages(["openssl", "chromium"]);
  const { beginRun, table, LATEST } = await import("@/tests/bench/report");
  const chosen = names.length ? names : Object.keys(BENCHES).filter((n) => n !== "soak");
  for (const n of chosen) if (!BENCHES[n]) throw new Error(`unknown bench ${n}; there are: ${Object.keys(BENCHES).join(", ")}`);
  // The whole set starts the figures afresh; named benches update theirs in the last run's.
  if (!names.length) beginRun();
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
  if (cmd === "start") await start(rest);
  else if (cmd === "test") await test(rest);
  else if (cmd === "bench") await bench(rest);
  else if (cmd === "faults") await faults(rest);
  else throw new Error(`unknown command ${cmd}`);
} catch (err) {
  console.error(err instanceof Error ? err.message : err);
  (clusterWatch as ClusterWatch | null)?.stop();
  await Promise.all(children.map((c) => c.stop(5_000)));
  stopExtras();
  process.exit(1);
}
