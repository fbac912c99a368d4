// `npm run bench`: the ingest's throughput and latency, printed, never asserted.
// Starts a throwaway PostgreSQL cluster ("pg-bench") and the ingest service (`ingest/main.ts`, its
// own process as under `npm start`, so the publishers here do not share its CPU) on a free port, then:
//  1. sustained: 20 probes publish QoS 1 as fast as the PUBACKs allow; readings/s from publish to
//     committed row (a PUBACK leaves only after the commit);
//  2. the same rows through a plain multi-row INSERT, and through insertReadings without MQTT;
//  3. paced at 2,000 readings/s: publish-to-PUBACK latency percentiles (an upper bound on
//     publish-to-commit: it adds the PUBACK's trip back to the client).
import { spawn, type ChildProcess } from "node:child_process";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { sql } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import { connectAsync, type MqttClient } from "mqtt";
import pg from "pg";
import { schema, type Db } from "@/db";
import { startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { insertReadings, type ReadingInput } from "@/db/queries/readings";
import { bins, farms, probes, zones } from "@/db/schema";
import { hashToken } from "@/lib/server/auth/tokens";
import { probeBaseName } from "@/lib/domain/metrics";

const CLUSTER = "pg-bench";
const PROBES = 20;
const SUSTAINED_MESSAGES_PER_PROBE = 2500;
const READINGS_PER_MESSAGE = 4; // temperature, moisture, ammonia, signal: one probe report
const WINDOW = 1000; // unacknowledged messages per client at most
const PACED_READINGS_PER_S = 2000;
const PACED_SECONDS = 10;

type BenchProbe = { id: number; code: string; token: string };

const root = path.resolve(import.meta.dirname, "../..");

async function freePort(): Promise<number> {
  const s = net.createServer().listen(0, "127.0.0.1");
  await new Promise((r) => s.once("listening", r));
  const { port } = s.address() as net.AddressInfo;
  await new Promise((r) => s.close(r));
  return port;
}

async function startService(databaseUrl: string, port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, ["--import", "tsx", "ingest/main.ts"], {
    cwd: root,
    env: { ...process.env, DATABASE_URL: databaseUrl, MQTT_PORT: String(port), MQTT_HOST: "127.0.0.1" },
    stdio: ["ignore", "pipe", "inherit"],
  });
  await new Promise<void>((resolve, reject) => {
    let out = "";
    child.stdout!.on("data", (b: Buffer) => {
      out += b.toString();
      if (out.includes("ingest: MQTT on")) resolve();
    });
    child.once("exit", (code) => reject(new Error(`ingest exited (${code}) before listening`)));
  });
  return child;
}

function stopService(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    child.once("exit", () => resolve());
    child.kill("SIGTERM");
  });
}

const fmt = (n: number, digits = 0) => n.toLocaleString("en-US", { maximumFractionDigits: digits, minimumFractionDigits: digits });

async function setUpProbes(d: Db): Promise<BenchProbe[]> {
  const [farm] = await d.insert(farms).values({ name: "Bench farm" }).returning();
  const [bin] = await d.insert(bins).values({ farmId: farm!.id, name: "Bench bin", style: "bed", species: "eisenia-fetida" }).returning();
  const [zone] = await d.insert(zones).values({ binId: bin!.id, position: 1, kind: "working" }).returning();
  const out: BenchProbe[] = [];
  for (let i = 0; i < PROBES; i++) {
    const code = `bench-${i}`;
    const token = `bench-token-${i}-${Math.random().toString(36).slice(2)}`;
    const [p] = await d
      .insert(probes)
      .values({ farmId: farm!.id, zoneId: zone!.id, code, tokenHash: hashToken(token) })
      .returning();
    out.push({ id: p!.id, code, token });
  }
  return out;
}

/** One probe report at `seconds`, and the rows it should become. */
function report(p: BenchProbe, seconds: number, k: number): { payload: string; rows: ReadingInput[] } {
  const temp = 18 + (k % 90) / 10;
  const moisture = 70 + (k % 150) / 10;
  const nh3 = (k % 40) / 10;
  const rssi = -60 - (k % 30);
  const payload = JSON.stringify([
    { bn: probeBaseName(p.code), bt: seconds, n: "temp", u: "Cel", v: temp },
    { n: "moisture", u: "/100", v: moisture },
    { n: "nh3", u: "ppm", v: nh3 },
    { n: "rssi", u: "dBm", v: rssi },
  ]);
  const ts = new Date(seconds * 1000);
  return {
    payload,
    rows: [
      { probeId: p.id, metric: "temperature", ts, value: temp },
      { probeId: p.id, metric: "moisture", ts, value: moisture },
      { probeId: p.id, metric: "ammonia", ts, value: nh3 },
      { probeId: p.id, metric: "signal", ts, value: rssi },
    ],
  };
}

async function connectAll(port: number, fleet: BenchProbe[]): Promise<MqttClient[]> {
  return Promise.all(
    fleet.map((p) =>
      connectAsync(`mqtt://127.0.0.1:${port}`, { clientId: p.code, username: p.code, password: p.token, protocolVersion: 4, reconnectPeriod: 0 }),
    ),
  );
}

async function storedRows(d: Db): Promise<number> {
  const r = await d.execute<{ n: number }>(sql`select count(*)::int as n from readings`);
  return r.rows[0]!.n;
}

async function truncate(d: Db) {
  await d.execute(sql`truncate readings, reading_rollups`);
}

async function sustained(port: number, fleet: BenchProbe[], d: Db) {
  const clients = await connectAll(port, fleet);
  const start = Math.floor(Date.now() / 1000) - 3 * 86_400;
  const all: ReadingInput[] = [];
  const plans = fleet.map((p, i) =>
    Array.from({ length: SUSTAINED_MESSAGES_PER_PROBE }, (_, k) => {
      const r = report(p, start + k * 60, k + i);
      all.push(...r.rows);
      return r.payload;
    }),
  );
  const t0 = performance.now();
  await Promise.all(
    plans.map(async (msgs, i) => {
      const c = clients[i]!;
      const topic = `wormward/${fleet[i]!.code}/readings`;
      const inFlight = new Set<Promise<unknown>>();
      for (const m of msgs) {
        while (inFlight.size >= WINDOW) await Promise.race(inFlight);
        const p: Promise<unknown> = c.publishAsync(topic, m, { qos: 1 }).finally(() => inFlight.delete(p));
        inFlight.add(p);
      }
      await Promise.all(inFlight);
    }),
  );
  const seconds = (performance.now() - t0) / 1000;
  await Promise.all(clients.map((c) => c.endAsync()));
  const stored = await storedRows(d);
  if (stored !== all.length) throw new Error(`expected ${all.length} rows after the sustained run, found ${stored}`);
  return { rows: all, seconds, messages: PROBES * SUSTAINED_MESSAGES_PER_PROBE };
}

/** Plain multi-row INSERT ... VALUES of 1,000 rows a statement, no rollups: the floor we compare with. */
async function rawInsert(pool: pg.Pool, rows: ReadingInput[]) {
  const client = await pool.connect();
  try {
    const t0 = performance.now();
    for (let i = 0; i < rows.length; i += 1000) {
      const chunk = rows.slice(i, i + 1000);
      const params: unknown[] = [];
      const values = chunk.map((r, j) => {
        params.push(r.probeId, r.metric, r.ts, r.value);
        return `($${4 * j + 1}, $${4 * j + 2}, $${4 * j + 3}, $${4 * j + 4})`;
      });
      await client.query(`insert into readings (probe_id, metric, ts, value) values ${values.join(", ")}`, params);
    }
    return (performance.now() - t0) / 1000;
  } finally {
    client.release();
  }
}

async function viaInsertReadings(d: Db, rows: ReadingInput[]) {
  const t0 = performance.now();
  for (let i = 0; i < rows.length; i += 1000) await insertReadings(rows.slice(i, i + 1000), d);
  return (performance.now() - t0) / 1000;
}

async function paced(port: number, fleet: BenchProbe[]) {
  const clients = await connectAll(port, fleet);
  const perSecond = PACED_READINGS_PER_S / READINGS_PER_MESSAGE;
  const total = perSecond * PACED_SECONDS;
  const start = Math.floor(Date.now() / 1000) - 86_400;
  const latencies: number[] = [];
  const pending: Promise<unknown>[] = [];
  const t0 = performance.now();
  let sent = 0;
  while (sent < total) {
    // Catch up to where the clock says we should be, then sleep a tick: steady, not bursty.
    const due = Math.min(total, Math.floor(((performance.now() - t0) / 1000) * perSecond));
    for (; sent < due; sent++) {
      const i = sent % PROBES;
      const p = fleet[i]!;
      const { payload } = report(p, start + Math.floor(sent / PROBES) * 10, sent);
      const at = performance.now();
      pending.push(clients[i]!.publishAsync(`wormward/${p.code}/readings`, payload, { qos: 1 }).then(() => latencies.push(performance.now() - at)));
    }
    await new Promise((r) => setTimeout(r, 5));
  }
  await Promise.all(pending);
  const elapsed = (performance.now() - t0) / 1000;
  await Promise.all(clients.map((c) => c.endAsync()));
  latencies.sort((a, b) => a - b);
  const pct = (q: number) => latencies[Math.min(latencies.length - 1, Math.ceil(q * latencies.length) - 1)]!;
  return { n: latencies.length, rate: (total * READINGS_PER_MESSAGE) / elapsed, p50: pct(0.5), p95: pct(0.95), p99: pct(0.99), max: latencies.at(-1)! };
}

async function main() {
  const cluster = await startCluster({ name: CLUSTER, port: 54349 });
  const admin = new pg.Client({ connectionString: cluster.adminUrl });
  await admin.connect();
  await admin.query("drop database if exists bench with (force)");
  await admin.query("create database bench");
  await admin.end();
  const url = cluster.adminUrl.replace(/\/postgres$/, "/bench");
  await runMigrations(url);
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  const d = drizzle(pool, { schema });
  let service: ChildProcess | null = null;
  try {
    const fleet = await setUpProbes(d);
    const port = await freePort();
    service = await startService(url, port);
    const pgVersion = (await pool.query("show server_version")).rows[0].server_version as string;
    console.log(
      `Wormward ingest bench: PostgreSQL ${pgVersion} (cluster ${CLUSTER}, 127.0.0.1:${cluster.port}), ingest/main.ts on 127.0.0.1:${port} with its default batching, ${os.cpus().length} CPU(s), Node ${process.version}`,
    );

    const s = await sustained(port, fleet, d);
    const mqttRate = s.rows.length / s.seconds;
    console.log(
      `\nSustained, MQTT publish → committed row: ${fmt(s.rows.length)} readings in ${fmt(s.messages)} QoS 1 messages from ${PROBES} probes in ${fmt(s.seconds, 2)} s` +
        `\n  ${fmt(mqttRate)} readings/s (${fmt(s.messages / s.seconds)} messages/s)`,
    );

    await truncate(d);
    const rawSeconds = await rawInsert(pool, s.rows);
    const rawRate = s.rows.length / rawSeconds;
    await truncate(d);
    const directSeconds = await viaInsertReadings(d, s.rows);
    const directRate = s.rows.length / directSeconds;
    await truncate(d);
    console.log(
      `Raw multi-row INSERT of the same rows (1,000 a statement, no rollups): ${fmt(rawRate)} readings/s` +
        `\n  ratio MQTT ingest / raw INSERT = ${fmt(mqttRate / rawRate, 2)}` +
        `\ninsertReadings of the same rows (unnest, ON CONFLICT, rollups; no MQTT): ${fmt(directRate)} readings/s` +
        `\n  ratio MQTT ingest / insertReadings = ${fmt(mqttRate / directRate, 2)}`,
    );

    const l = await paced(port, fleet);
    console.log(
      `\nPaced at ${fmt(PACED_READINGS_PER_S)} readings/s for ${PACED_SECONDS} s (achieved ${fmt(l.rate)}), ${fmt(l.n)} messages:` +
        `\n  publish → commit (PUBACK) latency p50 ${fmt(l.p50, 1)} ms, p95 ${fmt(l.p95, 1)} ms, p99 ${fmt(l.p99, 1)} ms, max ${fmt(l.max, 1)} ms`,
    );
  } finally {
    if (service) await stopService(service);
    await pool.end();
    stopCluster(CLUSTER);
  }
}

await main();
