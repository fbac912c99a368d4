// How soon `npm start` serves again, printed, never asserted: `npm run bench restart`. Runs the
// launcher itself (`node lib/stack/bootstrap.mjs start`) twice against a throwaway database on its
// own cluster, every port moved to a free one so it runs beside a developer's `npm start`, and times
// each from the spawn to the sign-in page answering 200. The first start migrates the empty database
// and builds the web app unless the last build is of the same sources; the second finds both done:
// `restart_s`, issue 14's "a second start of an unchanged tree reuses the build and serves in ≤ 15 s".
// No demo farm (WORMWARD_DEMO=0): its probe tokens would overwrite .data/demo-probes.json, which a
// running `npm start` of this tree reads; a seeded database costs a second start one count of farms.
import { spawn } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { startCluster, stopCluster } from "@/db/local-pg";
import { freePort } from "../setup/global";
import { record } from "./report";

const root = path.resolve(import.meta.dirname, "../..");
const DB = "wormward_restart_bench";
// Issue 14's target for a second start.
const TARGET_S = 15;

async function signInAnswers(url: string, until: number): Promise<void> {
  while (Date.now() < until) {
    try {
      const r = await fetch(url, { redirect: "manual" });
      await r.arrayBuffer();
      if (r.status === 200) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`${url} did not answer in time`);
}

async function portClosed(port: number, until: number) {
  while (Date.now() < until) {
    try {
      await fetch(`http://127.0.0.1:${port}/`);
    } catch {
      return;
    }
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** One launcher start: seconds from spawn to the sign-in page, and what it said about the build. */
async function startOnce(n: number, env: NodeJS.ProcessEnv, port: number): Promise<{ seconds: number; build: string }> {
  const logPath = path.join(root, ".data", "bench", `restart-${n}.log`);
  fs.mkdirSync(path.dirname(logPath), { recursive: true });
  const log = fs.openSync(logPath, "w");
  const t0 = performance.now();
  // Its own process group, so the launcher and every service it started stop together.
  const child = spawn(process.execPath, [path.join(root, "lib", "stack", "bootstrap.mjs"), "start"], {
    cwd: root,
    env,
    stdio: ["ignore", log, log],
    detached: true,
  });
  const exited = new Promise<void>((r) => child.once("exit", () => r()));
  try {
    await Promise.race([
      signInAnswers(`http://127.0.0.1:${port}/sign-in`, Date.now() + 15 * 60_000),
      exited.then(() => {
        throw new Error(`the launcher stopped before serving; see ${path.relative(root, logPath)}`);
      }),
    ]);
    const seconds = (performance.now() - t0) / 1000;
    // "Up in" is printed just after the sign-in page first answers.
    const until = Date.now() + 10_000;
    let said = "";
    while (Date.now() < until && !/Up in/.test(said)) {
      await new Promise((r) => setTimeout(r, 200));
      said = fs.readFileSync(logPath, "utf8");
    }
    const build = /web build (\w+)/.exec(said)?.[1] ?? "unknown";
    return { seconds, build };
  } finally {
    if (child.exitCode === null && child.pid) {
      process.kill(-child.pid, "SIGTERM");
      const stopped = await Promise.race([exited.then(() => true), new Promise<boolean>((r) => setTimeout(() => r(false), 15_000))]);
      if (!stopped) process.kill(-child.pid, "SIGKILL");
    }
    fs.closeSync(log);
    await portClosed(port, Date.now() + 15_000);
  }
}

async function main() {
  const name = `${process.env.WORMWARD_TEST_CLUSTER ?? "pg-test"}-restart`;
  const cluster = await startCluster({ name, port: Number(process.env.WORMWARD_TEST_PG_PORT ?? 54339) });
  try {
    const admin = new pg.Client({ connectionString: cluster.adminUrl });
    await admin.connect();
    await admin.query(`drop database if exists ${DB} with (force)`);
    await admin.query(`create database ${DB}`);
    await admin.end();
    const ports = new Set<number>();
    while (ports.size < 6) ports.add(await freePort());
    const [port, mqtt, smtp, mailbox, push, fleet] = [...ports] as [number, number, number, number, number, number];
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      DATABASE_URL: cluster.adminUrl.replace(/\/postgres$/, `/${DB}`),
      WORMWARD_DEMO: "0",
      PORT: String(port),
      MQTT_PORT: String(mqtt),
      SMTP_PORT: String(smtp),
      MAILBOX_HTTP_PORT: String(mailbox),
      PUSH_PORT: String(push),
      FLEET_CONTROL_PORT: String(fleet),
      PUSH_CA_FILE: path.join(root, ".data", "bench", "restart-push-ca.pem"),
    };
    const first = await startOnce(1, env, port);
    console.log(`first start (empty database, web build ${first.build}): ${first.seconds.toFixed(1)} s to the sign-in page`);
    const second = await startOnce(2, env, port);
    console.log(`second start (migrated database, web build ${second.build}): ${second.seconds.toFixed(1)} s to the sign-in page`);
    if (second.build !== "reused") console.log("  the second start built the web app again: its sources changed between the starts?");
    record({ first_start_s: first.seconds, restart_s: second.seconds }, [
      { what: `first start, spawn to sign-in page (web build ${first.build})`, value: first.seconds, unit: "s" },
      { what: `second start of an unchanged tree (web build ${second.build})`, value: second.seconds, unit: "s", target: `≤ ${TARGET_S} s` },
    ]);
  } finally {
    stopCluster(name);
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
