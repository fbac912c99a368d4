// `npm run bench push`: publish → push, printed and recorded (tests/bench/report.ts), never asserted.
// A throwaway cluster, the fake push service (fakes/push-service.ts) in this process and the ingest
// service (`ingest/main.ts`: broker, writer, rule runner, delivery worker) in its own, as under
// `npm start`. SAMPLES farms each have a bin, a zone, a probe and a keeper with one phone subscribed
// at the fake. Each probe's last half hour is already at 33.5 °C (stored before the service
// starts, so no rule has heard of it); then, one farm at a time, the probe publishes one more such
// reading at QoS 1. Measured: from just before that publish to the fake's receipt of the push
// (its receivedAt), i.e. publish → commit → NOTIFY → rule runner → alert and outbox row → NOTIFY →
// delivery worker → Web Push (VAPID, aes128gcm, TLS) → the push service. The service is otherwise
// idle: no other probe publishes meanwhile.
import { spawn, type ChildProcess } from "node:child_process";
import { createECDH, randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { connectAsync, type MqttClient } from "mqtt";
import pg from "pg";
import { schema } from "@/db";
import { startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import type { ReadingInput } from "@/db/queries/readings";
import { bins, farms, memberships, probes, pushSubscriptions, readings, users, zones } from "@/db/schema";
import { hashToken } from "@/lib/server/auth/tokens";
import { probeBaseName } from "@/lib/domain/metrics";
import { makeVapidKeys } from "@/lib/server/push/push";
import { startPushService } from "@/fakes/push-service";
import { BENCH_DIR, freePort, percentile, record } from "./report";

const CLUSTER = process.env.WORMWARD_BENCH_CLUSTER ?? "pg-bench";
const PG_PORT = Number(process.env.WORMWARD_BENCH_PG_PORT ?? 54349);
const SAMPLES = 30;
const HOT_C = 33.5; // at or above eisenia fetida's warm-stress line: an act-now heat alert
const GAP_MS = 250; // between one farm's push and the next farm's publish

const root = path.resolve(import.meta.dirname, "../..");

const fmt = (n: number | null, digits = 0) => (n == null ? "—" : n.toLocaleString("en-US", { maximumFractionDigits: digits, minimumFractionDigits: digits }));

const pack = (code: string, seconds: number, celsius: number) => JSON.stringify([{ bn: probeBaseName(code), bt: seconds, n: "temp", u: "Cel", v: celsius }]);

async function main() {
  const cluster = await startCluster({ name: CLUSTER, port: PG_PORT });
  const admin = new pg.Client({ connectionString: cluster.adminUrl });
  await admin.connect();
  await admin.query("drop database if exists bench_push with (force)");
  await admin.query("create database bench_push");
  await admin.end();
  const url = cluster.adminUrl.replace(/\/postgres$/, "/bench_push");
  await runMigrations(url);
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  const d = drizzle(pool, { schema });
  const push = await startPushService({ port: 0 });
  fs.mkdirSync(BENCH_DIR, { recursive: true });
  const caFile = path.join(BENCH_DIR, "push-ca.pem");
  fs.writeFileSync(caFile, push.ca);
  const vapid = makeVapidKeys();
  let service: ChildProcess | null = null;
  const clients: MqttClient[] = [];
  try {
    const now = Date.now();
    const farmsMade: { code: string; token: string; subscription: string }[] = [];
    const history: ReadingInput[] = [];
    for (let i = 0; i < SAMPLES; i++) {
      const [farm] = await d
        .insert(farms)
        .values({ name: `Push bench ${i}` })
        .returning();
      const [bin] = await d.insert(bins).values({ farmId: farm!.id, name: "Bed", style: "bed", species: "eisenia-fetida" }).returning();
      const [zone] = await d.insert(zones).values({ binId: bin!.id, position: 1, kind: "working" }).returning();
      const code = `push-bench-${i}`;
      const token = randomBytes(18).toString("base64url");
      const [probe] = await d
        .insert(probes)
        .values({ farmId: farm!.id, zoneId: zone!.id, code, tokenHash: hashToken(token), metrics: ["temperature"] })
        .returning();
      const [keeper] = await d
        .insert(users)
        .values({ email: `keeper-${i}@example.org`, name: `Keeper ${i}`, passwordHash: "x" })
        .returning();
      await d.insert(memberships).values({ userId: keeper!.id, farmId: farm!.id, role: "keeper" });
      const endpoint = push.subscriptionEndpoint();
      const ecdh = createECDH("prime256v1");
      ecdh.generateKeys();
      await d.insert(pushSubscriptions).values({
        userId: keeper!.id,
        endpoint,
        p256dh: ecdh.getPublicKey().toString("base64url"),
        auth: randomBytes(16).toString("base64url"),
      });
      for (let m = 30; m >= 1; m--) history.push({ probeId: probe!.id, metric: "temperature", ts: new Date(now - m * 60_000), value: HOT_C });
      farmsMade.push({ code, token, subscription: endpoint.slice(endpoint.lastIndexOf("/") + 1) });
    }

    const port = await freePort();
    service = spawn(process.execPath, ["--import", "tsx", "ingest/main.ts"], {
      cwd: root,
      env: {
        ...process.env,
        DATABASE_URL: url,
        MQTT_PORT: String(port),
        MQTT_HOST: "127.0.0.1",
        VAPID_PUBLIC_KEY: vapid.publicKey,
        VAPID_PRIVATE_KEY: vapid.privateKey,
        PUSH_CA_FILE: caFile,
        PUSH_FAKE_ORIGIN: push.url,
      },
      stdio: ["ignore", "pipe", "inherit"],
    });
    const child = service;
    await new Promise<void>((resolve, reject) => {
      let out = "";
      child.stdout!.on("data", (b: Buffer) => {
        out += b.toString();
        if (out.includes("ingest: MQTT on")) resolve();
      });
      child.once("exit", (code) => reject(new Error(`ingest exited (${code}) before listening`)));
    });
    for (const f of farmsMade) {
      clients.push(
        await connectAsync(`mqtt://127.0.0.1:${port}`, { clientId: f.code, username: f.code, password: f.token, protocolVersion: 4, reconnectPeriod: 0 }),
      );
    }
    // The rule runner LISTENs once its pool connects, and on (re)listening it evaluates every
    // monitored zone once (its catch-up); give it a moment, then put the half hour of heat in place
    // with a plain INSERT, which wakes no runner: the published reading is what meets the rule.
    await new Promise((r) => setTimeout(r, 1500));
    await d.insert(readings).values(history);

    const latencies: number[] = [];
    const missed: string[] = [];
    for (const [i, f] of farmsMade.entries()) {
      const sentAt = Date.now();
      await clients[i]!.publishAsync(`wormward/${f.code}/readings`, pack(f.code, Math.floor(sentAt / 1000), HOT_C), { qos: 1 });
      const until = sentAt + 10_000;
      let got: number | null = null;
      while (got === null && Date.now() < until) {
        const m = push.messages(f.subscription)[0];
        if (m) got = Date.parse(m.receivedAt) - sentAt;
        if (got !== null && got < 0) throw new Error(`a push for ${f.code} came before its reading was published: the rule was met without it`);
        else await new Promise((r) => setTimeout(r, 1));
      }
      if (got === null) missed.push(f.code);
      else latencies.push(got);
      await new Promise((r) => setTimeout(r, GAP_MS));
    }
    const p50 = percentile(latencies, 50);
    const p95 = percentile(latencies, 95);
    console.log(
      `Wormward push bench: ${SAMPLES} farms, one act-now heat reading each, published at QoS 1 on an otherwise idle ingest service (cluster ${CLUSTER})` +
        `\n  publish → push held by the fake push service: p50 ${fmt(p50, 1)} ms, p95 ${fmt(p95, 1)} ms, max ${fmt(latencies.length ? Math.max(...latencies) : null, 1)} ms` +
        (missed.length ? `\n  no push within 10 s for ${missed.length}: ${missed.join(", ")}` : ""),
    );
    record({ push_p50_ms: p50, push_p95_ms: p95 }, [
      { what: "publish → push p50", value: p50, unit: "ms" },
      { what: "publish → push p95", value: p95, unit: "ms", target: "≤ 100 ms" },
    ]);
  } finally {
    await Promise.all(clients.map((c) => c.endAsync()));
    if (service && service.exitCode === null) {
      const s = service;
      await new Promise<void>((resolve) => {
        s.once("exit", () => resolve());
        s.kill("SIGTERM");
      });
    }
    await push.close();
    await pool.end();
    stopCluster(CLUSTER);
  }
}

await main();
