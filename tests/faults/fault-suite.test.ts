// The fault suite (issue 15): under a steady load of simulated probes (real MQTT clients publishing
// SenML at QoS 1, some of them hot enough for the heat rule, so alerts are raised and pushed to the
// fake push service), kill -9 in turn the ingest broker, the web app, the rule runner (the ingest's
// workers process) and PostgreSQL's postmaster, and stop Redis when the tree has it. Nothing comes back
// by the test's hand: the supervisor of lib/stack/supervise.ts (the launcher's own) starts the dead
// processes again and its watchdog starts the cluster again. At the end: every acknowledged reading
// stored once, every alert raised once and pushed once, every component answering; the counts printed.
// Its own cluster, since it kills the postmaster; its own broker, workers and web app over it.
import { spawnSync } from "node:child_process";
import { createECDH, randomBytes } from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { schema } from "@/db";
import { startCluster, stopCluster, type Cluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { bins, farms, memberships, probes, pushSubscriptions, users, zones } from "@/db/schema";
import { startPushService, type PushService } from "@/fakes/push-service";
import { hashToken } from "@/lib/server/auth/tokens";
import { makeVapidKeys } from "@/lib/server/push/push";
import { postmasterPid, processAlive, supervise, watchCluster, type ClusterWatch, type Supervised } from "@/lib/stack/supervise";
import { freePort } from "../setup/global";
import { startProbeLoad, type ProbeLoad } from "./probes";

const root = path.resolve(import.meta.dirname, "../..");
const logDir = path.join(root, ".data", "faults");
const CLUSTER = `${inject("clusterName")}-faults`;
const CALM_PROBES = 6;
const EVERY_MS = 100; // each probe: 10 readings a second
const HOT_C = 33; // above eisenia fetida's warm stress of 30 °C (lib/domain/species.ts): the heat rule's act-now line
const CALM_C = 21; // inside its comfortable 15–25 °C
// Redis is the multi-node helper's (ingest/broker-backends.ts, lib/stack/redis-server.ts): its step
// runs once that file is in the tree, with REDIS_URL handed to the broker and the workers.
const WITH_REDIS = fs.existsSync(path.join(root, "lib", "stack", "redis-server.ts"));

type Zone = { probeId: number; code: string; token: string; zoneId: string };

let cluster: Cluster;
let watch: ClusterWatch;
let pool: pg.Pool;
let push: PushService;
let subscriptionId: string;
let farmId: string;
let mqttPort: number;
let webUrl: string;
const services: Record<string, Supervised> = {};
const calm: Zone[] = [];
const hot: Zone[] = [];
const loads: ProbeLoad[] = [];
const hotLoads = new Map<string, ProbeLoad>(); // zone id → its hot probe
const spare: Zone[] = []; // hot probes not started yet: one is started after each fault
const faults: { step: string; downMs: number }[] = [];
const started = Date.now();

const q = async <T extends pg.QueryResultRow>(text: string, values: unknown[] = []) => (await pool.query<T>(text, values)).rows;

async function waitFor<T>(what: string, fn: () => Promise<T> | T, done: (v: T) => boolean, timeoutMs = 60_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  let last: T | undefined;
  let lastError = "";
  for (;;) {
    try {
      last = await fn();
      if (done(last)) return last;
    } catch (err) {
      lastError = (err as Error).message;
    }
    if (Date.now() > until) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}; last: ${JSON.stringify(last)} ${lastError}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

const portOpen = (port: number) =>
  new Promise<boolean>((resolve) => {
    const s = net.connect(port, "127.0.0.1");
    s.once("connect", () => (s.destroy(), resolve(true)));
    s.once("error", () => resolve(false));
  });

function kill9(pid: number) {
  process.kill(pid, "SIGKILL");
}

/** Every running probe has had a reading acknowledged after `since`. */
const allAckingSince = (since: number) =>
  waitFor(
    "every probe's readings to be acknowledged again",
    () => loads.filter((l) => l.active()).map((l) => l.ackedSince(since)),
    (a) => a.every((n) => n > 0),
  );

async function webAnswers() {
  const r = await fetch(`${webUrl}/sign-in`);
  return r.status;
}

/** Starts the next hot probe and waits for its zone's heat alert: the rule runner (and the database under it) works. */
async function nextHotAlert(label: string) {
  const z = spare.shift();
  if (!z) throw new Error("no hot probe left");
  startLoad(z, true);
  await waitFor(
    `the heat alert of the hot zone started ${label}`,
    () => q<{ n: number }>(`select count(*)::int as n from alerts where zone_id = $1 and kind = 'heat'`, [z.zoneId]),
    (r) => (r[0]?.n ?? 0) > 0,
    90_000,
  );
}

function startLoad(z: Zone, isHot: boolean, burst = false) {
  const l = startProbeLoad({
    burst,
    port: mqttPort,
    code: z.code,
    token: z.token,
    everyMs: EVERY_MS,
    celsius: isHot ? HOT_C : CALM_C,
    // A hot probe first sends its last 15 minutes (the heat rule holds 10 minutes before raising).
    ...(isHot ? { backfillS: 15 * 60, backfillStepS: 6 } : {}),
  });
  loads.push(l);
  if (isHot) hotLoads.set(z.zoneId, l);
}

async function seed(url: string) {
  const own = new pg.Pool({ connectionString: url, max: 2 });
  const d = drizzle(own, { schema });
  const [farm] = await d.insert(farms).values({ name: "Fault suite farm" }).returning();
  farmId = farm!.id;
  const [keeper] = await d.insert(users).values({ email: "keeper@faults.example.org", name: "Keeper", passwordHash: "x" }).returning();
  await d.insert(memberships).values({ userId: keeper!.id, farmId, role: "keeper" });
  // The keeper's phone, subscribed at the fake push service like a browser (RFC 8291 §2 keys).
  const endpoint = push.subscriptionEndpoint();
  subscriptionId = endpoint.slice(endpoint.lastIndexOf("/") + 1);
  const ecdh = createECDH("prime256v1");
  ecdh.generateKeys();
  await d
    .insert(pushSubscriptions)
    .values({ userId: keeper!.id, endpoint, p256dh: ecdh.getPublicKey().toString("base64url"), auth: randomBytes(16).toString("base64url") });
  const make = async (i: number, kind: string): Promise<Zone> => {
    const [bin] = await d
      .insert(bins)
      .values({ farmId, name: `${kind} bin ${i}`, style: "tote", species: "eisenia-fetida" })
      .returning();
    const [zone] = await d.insert(zones).values({ binId: bin!.id, position: 1, kind: "working" }).returning();
    const code = `fault-${kind}-${i}`;
    const token = randomBytes(18).toString("base64url");
    const [p] = await d
      .insert(probes)
      .values({ farmId, zoneId: zone!.id, code, tokenHash: hashToken(token), metrics: ["temperature"], reportIntervalS: 60 })
      .returning();
    return { probeId: p!.id, code, token, zoneId: zone!.id };
  };
  for (let i = 0; i < CALM_PROBES; i++) calm.push(await make(i, "calm"));
  // One hot zone before the faults, one after each fault (its alert shows the rule runner works again).
  for (let i = 0; i < 4 + (WITH_REDIS ? 1 : 0); i++) hot.push(await make(i, "hot"));
  await own.end();
}

beforeAll(async () => {
  fs.mkdirSync(logDir, { recursive: true });
  for (const f of fs.readdirSync(logDir)) fs.rmSync(path.join(logDir, f), { recursive: true, force: true });
  cluster = await startCluster({ name: CLUSTER, port: await freePort() });
  const admin = new pg.Client({ connectionString: cluster.adminUrl });
  await admin.connect();
  await admin.query("drop database if exists faults with (force)");
  await admin.query("create database faults");
  await admin.end();
  const url = cluster.adminUrl.replace(/\/postgres$/, "/faults");
  await runMigrations(url);
  pool = new pg.Pool({ connectionString: url, max: 3, connectionTimeoutMillis: 3_000 });
  pool.on("error", () => {}); // its idle connections die with the postmaster, on purpose
  // The launcher's own watchdog: the test never starts the cluster again itself.
  watch = watchCluster(cluster, CLUSTER, { everyMs: 500 });

  push = await startPushService({ port: 0 });
  const caFile = path.join(logDir, "push-ca.pem");
  fs.writeFileSync(caFile, push.ca);
  await seed(url);

  mqttPort = await freePort();
  const webPort = await freePort();
  webUrl = `http://127.0.0.1:${webPort}`;
  const vapid = makeVapidKeys();
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: url,
    MQTT_PORT: String(mqttPort),
    MQTT_HOST: "127.0.0.1",
    VAPID_PUBLIC_KEY: vapid.publicKey,
    VAPID_PRIVATE_KEY: vapid.privateKey,
    PUSH_CA_FILE: caFile,
    PUSH_FAKE_ORIGIN: push.url,
    PUSH_TIMEOUT_MS: "3000",
    DEBUG: "wormward:*",
  };
  delete env.SMTP_PORT; // no e-mail: the keeper has a phone, and pushes are what is counted
  if (WITH_REDIS) {
    // Debian's redis-server on a port of ours, data under .data/faults, kept running like the rest.
    if (!fs.existsSync("/usr/bin/redis-server")) {
      const r = spawnSync("apt-get", ["install", "-y", "--no-install-recommends", "redis-server"], {
        stdio: "inherit",
        env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
      });
      if (r.status !== 0) throw new Error("apt-get install redis-server failed");
    }
    const redisPort = await freePort();
    const redisDir = path.join(logDir, "redis");
    fs.mkdirSync(redisDir, { recursive: true });
    services.redis = supervise({
      name: "redis",
      cmd: "/usr/bin/redis-server",
      args: ["--port", String(redisPort), "--bind", "127.0.0.1", "--dir", redisDir, "--appendonly", "yes", "--save", ""],
      cwd: root,
      logFile: path.join(logDir, "redis.log"),
    });
    await waitFor("redis-server", () => portOpen(redisPort), Boolean, 30_000);
    env.REDIS_URL = `redis://127.0.0.1:${redisPort}`;
  }
  // node --import tsx: one process per service, so kill -9 hits the service itself.
  const node = (name: string, args: string[], minBackoffMs = 200) =>
    (services[name] = supervise({
      name,
      cmd: process.execPath,
      args: ["--import", "tsx", ...args],
      env,
      cwd: root,
      logFile: path.join(logDir, `${name}.log`),
      minBackoffMs,
    }));
  node("broker", ["ingest/main.ts", "--role", "broker"]);
  // The workers wait 2 s before a restart, so the burst of the rule runner's step is surely committed
  // before a new runner listens: its alert can then come only from the catch-up.
  node("workers", ["ingest/main.ts", "--role", "workers"], 2_000);
  services.web = supervise({
    name: "web",
    cmd: process.execPath,
    args: [path.join(root, "node_modules", "next", "dist", "bin", "next"), "start", "-H", "127.0.0.1", "-p", String(webPort)],
    env: {
      ...env,
      NODE_ENV: "production",
      NEXT_TELEMETRY_DISABLED: "1",
      NEXTAUTH_SECRET: "fault-suite-secret-0123456789",
      NEXTAUTH_URL: webUrl,
      APP_URL: webUrl,
      DEBUG: "",
    },
    cwd: root,
    logFile: path.join(logDir, "web.log"),
    minBackoffMs: 200,
  });
  await waitFor("the broker's port", () => portOpen(mqttPort), Boolean, 60_000);
  await waitFor("the web app", webAnswers, (s) => s === 200, 90_000);
  await waitFor(
    "the workers",
    () => fs.readFileSync(path.join(logDir, "workers.log"), "utf8"),
    (t) => t.includes("rule runner, deliveries and digests running"),
    60_000,
  );

  for (const z of calm) startLoad(z, false);
  spare.push(...hot);
  await allAckingSince(Date.now());
  await nextHotAlert("before the faults");
}, 240_000);

afterAll(async () => {
  await Promise.allSettled(loads.map((l) => l.close()));
  await Promise.allSettled(Object.values(services).map((s) => s.stop(5_000)));
  watch?.stop();
  await pool?.end().catch(() => {});
  await push?.close();
  stopCluster(CLUSTER);
});

/** kill -9 of one supervised service; resolves when the supervisor has a new one running. */
async function killService(name: string) {
  const s = services[name]!;
  const pid = s.pid();
  expect(pid, `${name} runs`).toBeDefined();
  const t0 = Date.now();
  const restartsBefore = s.restarts();
  kill9(pid!);
  const newPid = await s.running(pid);
  expect(newPid).not.toBe(pid);
  expect(s.restarts()).toBe(restartsBefore + 1);
  return t0;
}

describe("faults under a steady load of probes", () => {
  it("kill -9 of the ingest broker: probes reconnect and resend, the supervisor starts it again", async () => {
    const t0 = await killService("broker");
    await waitFor("the broker's port", () => portOpen(mqttPort), Boolean);
    await allAckingSince(Date.now());
    faults.push({ step: "broker kill -9", downMs: Date.now() - t0 });
    expect(loads.some((l) => l.reconnects() > 0)).toBe(true);
  }, 180_000);

  it("kill -9 of the web app: it answers again", async () => {
    const t0 = await killService("web");
    await waitFor("the web app", webAnswers, (s) => s === 200, 90_000);
    faults.push({ step: "web kill -9", downMs: Date.now() - t0 });
  }, 180_000);

  it("kill -9 of the rule runner (the workers process): started again, it catches up on readings committed while it was down", async () => {
    // A hot probe uploads its last 15 minutes in one burst just after the kill, then sleeps: those
    // readings are committed while no runner listens, so only the restarted runner's catch-up sees them.
    const z = spare.shift()!;
    const s = services.workers!;
    const pid = s.pid()!;
    const readyLines = () => fs.readFileSync(path.join(logDir, "workers.log"), "utf8").split("rule runner, deliveries and digests running").length - 1;
    const readyBefore = readyLines();
    startLoad(z, true, true);
    const burst = hotLoads.get(z.zoneId)!;
    await burst.connected();
    const t0 = Date.now();
    kill9(pid);
    burst.burst();
    await burst.drain(60_000);
    const [n] = await q<{ n: number }>(`select count(*)::int as n from readings where probe_id = $1`, [z.probeId]);
    expect(n?.n).toBe(burst.published());
    // The new runner was not listening yet when they were committed (else a NOTIFY would tell it).
    expect(readyLines()).toBe(readyBefore);
    await s.running(pid);
    await waitFor("the workers to listen again", readyLines, (k) => k > readyBefore);
    await waitFor(
      "the heat alert of the zone heated while the runner was down",
      () => q<{ n: number }>(`select count(*)::int as n from alerts where zone_id = $1 and kind = 'heat'`, [z.zoneId]),
      (r) => (r[0]?.n ?? 0) > 0,
      90_000,
    );
    faults.push({ step: "rule runner kill -9", downMs: Date.now() - t0 });
    await nextHotAlert("after the rule runner came back");
  }, 240_000);

  it("kill -9 of PostgreSQL's postmaster: the watchdog starts it again and everything reconnects", async () => {
    const pid = postmasterPid(cluster.dataDir);
    expect(pid).not.toBeNull();
    const before = watch.restarts();
    const t0 = Date.now();
    kill9(pid!);
    await waitFor(
      "the watchdog to start the cluster again",
      () => watch.restarts(),
      (n) => n > before,
      90_000,
    );
    const newPid = postmasterPid(cluster.dataDir);
    expect(newPid).not.toBe(pid);
    expect(processAlive(newPid!)).toBe(true);
    await waitFor(
      "the database",
      () => q("select 1"),
      (r) => r.length === 1,
    );
    await allAckingSince(Date.now());
    await waitFor("the web app", webAnswers, (s) => s === 200, 90_000);
    faults.push({ step: "postgres kill -9", downMs: Date.now() - t0 });
    await nextHotAlert("after PostgreSQL came back");
  }, 240_000);

  it.runIf(WITH_REDIS)(
    "Redis stopped (kill -9): the supervisor starts it again and the broker carries on",
    async () => {
      const t0 = await killService("redis");
      await allAckingSince(Date.now());
      faults.push({ step: "redis kill -9", downMs: Date.now() - t0 });
      await nextHotAlert("after Redis came back");
    },
    180_000,
  );

  it("lost nothing, stored nothing twice, raised and pushed no alert twice; every component back", async () => {
    for (const l of loads) await l.drain(90_000);
    const failed = loads.flatMap((l) => l.failed());
    expect(failed).toEqual([]);
    const published = loads.reduce((a, l) => a + l.published(), 0);
    const acked = loads.reduce((a, l) => a + l.acked(), 0);
    expect(acked).toBe(published);

    const ids = [...calm, ...hot].map((z) => z.probeId);
    const [stored] = await q<{ rows: number; distinct: number; rolled: number }>(
      `select (select count(*)::int from readings where probe_id = any($1)) as rows,
              (select count(distinct (probe_id, metric, ts))::int from readings where probe_id = any($1)) as distinct,
              (select coalesce(sum(count), 0)::int from reading_rollups where probe_id = any($1)) as rolled`,
      [ids],
    );
    // Every PUBACKed reading stored, none twice (a resend of a committed one is a no-op; the hourly rollups counted each once).
    expect(stored).toEqual({ rows: acked, distinct: acked, rolled: acked });

    // Every hot zone heated: one heat alert each, none in the calm zones, no subject open twice.
    const startedHot = hot.filter((z) => hotLoads.has(z.zoneId));
    const alertRows = await q<{ id: string; subject: string; kind: string; zone_id: string; level: string }>(
      `select id, subject, kind::text, zone_id, level::text from alerts where farm_id = $1`,
      [farmId],
    );
    const heat = alertRows.filter((a) => a.kind === "heat");
    expect(heat.map((a) => a.zone_id).sort()).toEqual(startedHot.map((z) => z.zoneId).sort());
    expect(new Set(alertRows.map((a) => a.subject)).size).toBe(alertRows.length);
    const raised = await q<{ alert_id: string; n: number }>(
      `select alert_id, count(*)::int as n from alert_events e join alerts a on a.id = e.alert_id where a.farm_id = $1 and e.type = 'raised' group by alert_id`,
      [farmId],
    );
    expect(raised.map((r) => r.n)).toEqual(alertRows.map(() => 1));

    // Every push delivery ended as sent, once; the fake push service got one message per delivery.
    const pushes = await waitFor(
      "every push to be sent",
      () =>
        q<{ id: number; state: string; alert_id: string; reason: string; sent_events: number }>(
          `select d.id, d.state::text, d.alert_id, d.reason,
                  (select count(*)::int from alert_events e where e.alert_id = d.alert_id and e.type = 'sent' and e.channel = 'push' and e.detail->>'reason' = d.reason) as sent_events
           from deliveries d where d.farm_id = $1 and d.channel = 'push'`,
          [farmId],
        ),
      (rows) => rows.length >= alertRows.length && rows.every((r) => r.state === "sent"),
      120_000,
    );
    expect(pushes.map((p) => p.sent_events)).toEqual(pushes.map(() => 1));
    // Each alert raised is pushed to the keeper's one phone, on its raise, once.
    expect(
      pushes
        .filter((p) => p.reason === "raised")
        .map((p) => p.alert_id)
        .sort(),
    ).toEqual(alertRows.map((a) => a.id).sort());
    const received = push.messages(subscriptionId);
    const topics = received.map((m) => m.headers.topic);
    expect(new Set(topics).size).toBe(received.length);
    expect(received.length).toBe(pushes.length);

    // Every component back and answering, none started by hand.
    for (const [name, s] of Object.entries(services)) {
      expect(processAlive(s.pid()!), `${name} runs`).toBe(true);
      // At least once: a process may also fall over when the database goes (and is started again).
      expect(s.restarts(), `${name} was started again by the supervisor`).toBeGreaterThanOrEqual(1);
    }
    expect(watch.restarts()).toBe(1);
    expect(await portOpen(mqttPort)).toBe(true);
    expect(await webAnswers()).toBe(200);

    const counts = {
      published,
      acked,
      stored: stored!.rows,
      rolledUp: stored!.rolled,
      alertsRaised: alertRows.length,
      heatAlerts: heat.length,
      pushesSent: pushes.length,
      pushesReceived: received.length,
      reconnects: loads.reduce((a, l) => a + l.reconnects(), 0),
      resentByProbes: loads.reduce((a, l) => a + l.resends(), 0),
      ...Object.fromEntries(Object.entries(services).map(([name, s]) => [`restarts.${name}`, s.restarts()])),
      "restarts.postgres": watch.restarts(),
      seconds: Math.round((Date.now() - started) / 1000),
    };
    console.log(
      [
        "Fault suite counts:",
        ...Object.entries(counts).map(([k, v]) => `  ${k.padEnd(15)} ${v}`),
        "  back after (kill to serving again):",
        ...faults.map((f) => `    ${f.step.padEnd(22)} ${(f.downMs / 1000).toFixed(1)} s`),
        WITH_REDIS ? "" : "  Redis step skipped: lib/stack/redis-server.ts is not in this tree",
      ].join("\n"),
    );
  }, 300_000);
});
