// `npm run bench ingest`: the ingest's throughput and latency beside its ceilings, printed and
// recorded (tests/bench/report.ts), never asserted.
// Starts a throwaway PostgreSQL cluster and the ingest service (`ingest/main.ts`, its own process as
// under `npm start`, so the publishers here do not share its CPU) on a free port, then:
//  1. sustained: 50 probes publish SenML packs of 4 readings at QoS 1 as fast as the PUBACKs allow
//     (a window of unacknowledged messages per probe); every 50th message is a resend of the one
//     before it, as from a probe that missed a PUBACK. Readings/s from the first publish to the last
//     PUBACK (a PUBACK leaves only after its commit); checked after: every distinct reading stored
//     once, and the hourly rollups count every stored row once;
//  2. the same distinct rows, in the same run: a plain multi-row INSERT (1,000 rows a statement, no
//     rollups: the ceiling), insertReadings alone (unnest, ON CONFLICT, rollups, NOTIFY; no MQTT),
//     COPY from one client; and the broker alone (aedes, no database): QoS 1 messages/s;
//  3. paced at 2,000 and at 10,000 messages/s: publish → PUBACK latency. The PUBACK is sent after
//     the commit, so this is publish → commit plus the PUBACK's trip back to the client (loopback).
// WORMWARD_BENCH_PROFILE=1 also runs the service with `node --cpu-prof` (profiles in
// .data/bench/prof/) and prints pg_stat_statements for the sustained run.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { sql } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import { connectAsync, type MqttClient } from "mqtt";
import pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { schema, type Db } from "@/db";
import { startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { insertReadings, type ReadingInput } from "@/db/queries/readings";
import { bins, farms, probes, zones } from "@/db/schema";
import { hashToken } from "@/lib/server/auth/tokens";
import { probeBaseName } from "@/lib/domain/metrics";
import { BENCH_DIR, freePort, percentile, record } from "./report";

const CLUSTER = process.env.WORMWARD_BENCH_CLUSTER ?? "pg-bench";
const PG_PORT = Number(process.env.WORMWARD_BENCH_PG_PORT ?? 54349);
const PROFILE = process.env.WORMWARD_BENCH_PROFILE === "1";
const PROBES = 50;
const SUSTAINED_MESSAGES_PER_PROBE = 2000;
const RESEND_EVERY = 50; // every 50th message repeats the one before it
const READINGS_PER_MESSAGE = 4; // temperature, moisture, ammonia, signal: one probe report
const WINDOW = 200; // unacknowledged messages per probe at most
const PACED = [
  { messagesPerS: 2000, seconds: 8 },
  { messagesPerS: 10_000, seconds: 5 },
];

type BenchProbe = { id: number; code: string; token: string };

const root = path.resolve(import.meta.dirname, "../..");

async function startChild(script: string, env: Record<string, string>, ready: RegExp, nodeArgs: string[] = []): Promise<ChildProcess> {
  const child = spawn(process.execPath, [...nodeArgs, "--import", "tsx", script], {
    cwd: root,
    env: { ...process.env, ...env },
    stdio: ["ignore", "pipe", "inherit"],
  });
  await new Promise<void>((resolve, reject) => {
    let out = "";
    child.stdout!.on("data", (b: Buffer) => {
      out += b.toString();
      if (ready.test(out)) resolve();
    });
    child.once("exit", (code) => reject(new Error(`${script} exited (${code}) before listening`)));
  });
  return child;
}

function stopChild(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    child.once("exit", () => resolve());
    child.kill("SIGTERM");
  });
}

const fmt = (n: number | null, digits = 0) => (n == null ? "—" : n.toLocaleString("en-US", { maximumFractionDigits: digits, minimumFractionDigits: digits }));

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

function connectAll(port: number, fleet: BenchProbe[], auth = true): Promise<MqttClient[]> {
  return Promise.all(
    fleet.map((p) =>
      connectAsync(`mqtt://127.0.0.1:${port}`, {
        clientId: p.code,
        ...(auth ? { username: p.code, password: p.token } : {}),
        protocolVersion: 4,
        reconnectPeriod: 0,
      }),
    ),
  );
}

async function counts(d: Db) {
  const r = await d.execute<{ n: number; rolled: number }>(
    sql`select (select count(*)::int from readings) as n, (select coalesce(sum(count), 0)::int from reading_rollups) as rolled`,
  );
  return r.rows[0]!;
}

async function truncate(d: Db) {
  await d.execute(sql`truncate readings, reading_rollups`);
}

type Plan = { topic: string; payloads: string[] }[];

/** Each probe's messages, every RESEND_EVERY-th a copy of the one before; and the distinct rows. */
function sustainedPlan(fleet: BenchProbe[]): { plan: Plan; rows: ReadingInput[]; messages: number } {
  const start = Math.floor(Date.now() / 1000) - 3 * 86_400;
  const rows: ReadingInput[] = [];
  let messages = 0;
  const plan = fleet.map((p, i) => {
    const payloads: string[] = [];
    for (let k = 0; k < SUSTAINED_MESSAGES_PER_PROBE; k++) {
      if (k % RESEND_EVERY === RESEND_EVERY - 1) {
        payloads.push(payloads.at(-1)!);
        continue;
      }
      const r = report(p, start + k * 60, k + i);
      rows.push(...r.rows);
      payloads.push(r.payload);
    }
    messages += payloads.length;
    return { topic: `wormward/${p.code}/readings`, payloads };
  });
  return { plan, rows, messages };
}

/** Publishes every probe's messages at QoS 1, each probe keeping WINDOW unacknowledged at most. */
async function publishAll(clients: MqttClient[], plan: Plan): Promise<number> {
  const t0 = performance.now();
  await Promise.all(
    plan.map(async ({ topic, payloads }, i) => {
      const c = clients[i]!;
      const inFlight = new Set<Promise<unknown>>();
      for (const m of payloads) {
        while (inFlight.size >= WINDOW) await Promise.race(inFlight);
        const p: Promise<unknown> = c.publishAsync(topic, m, { qos: 1 }).finally(() => inFlight.delete(p));
        inFlight.add(p);
      }
      await Promise.all(inFlight);
    }),
  );
  return (performance.now() - t0) / 1000;
}

/** Plain multi-row INSERT ... VALUES of 1,000 rows a statement, no rollups: the ceiling we compare with. */
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

/** COPY ... FROM STDIN (text format) of every row from one client, no rollups. */
async function viaCopy(pool: pg.Pool, rows: ReadingInput[]) {
  const client = await pool.connect();
  try {
    const t0 = performance.now();
    const stream = client.query(copyFrom("copy readings (probe_id, metric, ts, value) from stdin"));
    async function* lines() {
      for (let i = 0; i < rows.length; i += 5000) {
        yield rows
          .slice(i, i + 5000)
          .map((r) => `${r.probeId}\t${r.metric}\t${r.ts.toISOString()}\t${r.value}\n`)
          .join("");
      }
    }
    await pipeline(Readable.from(lines()), stream);
    return (performance.now() - t0) / 1000;
  } finally {
    client.release();
  }
}

/** The broker alone in its own process: the same messages, QoS 1, no database. */
async function brokerOnly(fleet: BenchProbe[], plan: Plan) {
  const port = await freePort();
  const child = await startChild("tests/bench/broker-only.ts", { MQTT_PORT: String(port) }, /broker-only: MQTT on/);
  try {
    const clients = await connectAll(port, fleet, false);
    const seconds = await publishAll(clients, plan);
    await Promise.all(clients.map((c) => c.endAsync()));
    return seconds;
  } finally {
    await stopChild(child);
  }
}

/** Publishes at a steady rate from all probes; publish → PUBACK of every message. */
async function paced(port: number, fleet: BenchProbe[], messagesPerS: number, seconds: number, startSeconds: number) {
  const clients = await connectAll(port, fleet);
  const total = messagesPerS * seconds;
  const latencies: number[] = [];
  const pending: Promise<unknown>[] = [];
  const t0 = performance.now();
  let sent = 0;
  while (sent < total) {
    // Catch up to where the clock says we should be, then sleep a tick: steady, not bursty.
    const due = Math.min(total, Math.floor(((performance.now() - t0) / 1000) * messagesPerS));
    for (; sent < due; sent++) {
      const i = sent % PROBES;
      const p = fleet[i]!;
      const { payload } = report(p, startSeconds + Math.floor(sent / PROBES), sent);
      const at = performance.now();
      pending.push(clients[i]!.publishAsync(`wormward/${p.code}/readings`, payload, { qos: 1 }).then(() => latencies.push(performance.now() - at)));
    }
    await new Promise((r) => setTimeout(r, 2));
  }
  await Promise.all(pending);
  const elapsed = (performance.now() - t0) / 1000;
  await Promise.all(clients.map((c) => c.endAsync()));
  return {
    n: latencies.length,
    rate: total / elapsed,
    p50: percentile(latencies, 50)!,
    p95: percentile(latencies, 95)!,
    p99: percentile(latencies, 99)!,
    max: Math.max(...latencies),
  };
}

/** pg_stat_statements needs the library preloaded: set once on the bench cluster, then restart. */
async function withStatements(adminUrl: string): Promise<boolean> {
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  try {
    const r = await admin.query<{ shared_preload_libraries: string }>("show shared_preload_libraries");
    if (r.rows[0]!.shared_preload_libraries.includes("pg_stat_statements")) return false;
    await admin.query("alter system set shared_preload_libraries = 'pg_stat_statements'");
    return true;
  } finally {
    await admin.end();
  }
}

async function printStatements(pool: pg.Pool) {
  const r = await pool.query<{ calls: string; total: number; mean: number; rows: string; query: string }>(
    `select calls, round(total_exec_time::numeric, 1)::float8 as total, round(mean_exec_time::numeric, 3)::float8 as mean, rows,
            left(regexp_replace(query, '\\s+', ' ', 'g'), 110) as query
     from pg_stat_statements where dbid = (select oid from pg_database where datname = current_database())
     order by total_exec_time desc limit 8`,
  );
  console.log("  pg_stat_statements (sustained run), by total time:");
  for (const s of r.rows) console.log(`    ${fmt(s.total, 1).padStart(9)} ms  ${s.calls.padStart(7)} calls  ${fmt(s.mean, 3).padStart(7)} ms/call  ${s.query}`);
}

async function main() {
  let cluster = await startCluster({ name: CLUSTER, port: PG_PORT });
  if (PROFILE && (await withStatements(cluster.adminUrl))) {
    stopCluster(CLUSTER);
    cluster = await startCluster({ name: CLUSTER, port: PG_PORT });
  }
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
    const profDir = path.join(BENCH_DIR, "prof");
    if (PROFILE) {
      fs.mkdirSync(profDir, { recursive: true });
      await pool.query("create extension if not exists pg_stat_statements");
    }
    service = await startChild(
      "ingest/main.ts",
      { DATABASE_URL: url, MQTT_PORT: String(port), MQTT_HOST: "127.0.0.1" },
      /ingest: MQTT on/,
      PROFILE ? ["--cpu-prof", `--cpu-prof-dir=${profDir}`] : [],
    );
    const pgVersion = (await pool.query("show server_version")).rows[0].server_version as string;
    console.log(
      `Wormward ingest bench: PostgreSQL ${pgVersion} (cluster ${CLUSTER}, 127.0.0.1:${cluster.port}), ingest/main.ts on 127.0.0.1:${port} with its default batching, ${os.cpus().length} CPU(s), Node ${process.version}`,
    );

    // 1. Sustained, through MQTT.
    const { plan, rows, messages } = sustainedPlan(fleet);
    if (PROFILE) await pool.query("select pg_stat_statements_reset()");
    const clients = await connectAll(port, fleet);
    const mqttSeconds = await publishAll(clients, plan);
    await Promise.all(clients.map((c) => c.endAsync()));
    if (PROFILE) await printStatements(pool);
    const after = await counts(d);
    if (after.n !== rows.length) throw new Error(`expected ${rows.length} distinct rows after the sustained run, found ${after.n}`);
    if (after.rolled !== rows.length) throw new Error(`the hourly rollups count ${after.rolled} readings, not ${rows.length}`);
    const published = messages * READINGS_PER_MESSAGE;
    const mqttRate = published / mqttSeconds;
    console.log(
      `\nSustained, MQTT publish → committed row: ${fmt(published)} readings (${fmt(rows.length)} distinct, ${fmt(published - rows.length)} resent) in ${fmt(messages)} QoS 1 messages from ${PROBES} probes in ${fmt(mqttSeconds, 2)} s` +
        `\n  ${fmt(mqttRate)} readings/s (${fmt(messages / mqttSeconds)} messages/s); stored once each, hourly rollups count ${fmt(after.rolled)}`,
    );

    // 2. The same distinct rows without MQTT, and the broker without the database.
    await truncate(d);
    const rawRate = rows.length / (await rawInsert(pool, rows));
    await truncate(d);
    const directRate = rows.length / (await viaInsertReadings(d, rows));
    await truncate(d);
    const copyRate = rows.length / (await viaCopy(pool, rows));
    await truncate(d);
    const brokerRate = messages / (await brokerOnly(fleet, plan));
    console.log(
      `Multi-row INSERT of the same rows (1,000 a statement, no rollups): ${fmt(rawRate)} readings/s; MQTT ingest / INSERT = ${fmt(mqttRate / rawRate, 2)}` +
        `\ninsertReadings alone (unnest, ON CONFLICT, rollups, NOTIFY; no MQTT): ${fmt(directRate)} readings/s; MQTT ingest / insertReadings = ${fmt(mqttRate / directRate, 2)}` +
        `\nCOPY from one client (no rollups): ${fmt(copyRate)} readings/s` +
        `\nBroker alone (aedes, no database), the same messages at QoS 1: ${fmt(brokerRate)} messages/s (${fmt(brokerRate * READINGS_PER_MESSAGE)} readings/s); MQTT ingest messages/s / broker = ${fmt(messages / mqttSeconds / brokerRate, 2)}`,
    );

    // 3. Latency at a steady rate.
    const lat: Awaited<ReturnType<typeof paced>>[] = [];
    for (const [j, { messagesPerS, seconds }] of PACED.entries()) {
      const l = await paced(port, fleet, messagesPerS, seconds, Math.floor(Date.now() / 1000) - (j + 1) * 86_400);
      lat.push(l);
      console.log(
        `\nPaced at ${fmt(messagesPerS)} messages/s (${fmt(messagesPerS * READINGS_PER_MESSAGE)} readings/s) for ${seconds} s (achieved ${fmt(l.rate)} messages/s), ${fmt(l.n)} messages:` +
          `\n  publish → commit (PUBACK back at the client) p50 ${fmt(l.p50, 1)} ms, p95 ${fmt(l.p95, 1)} ms, p99 ${fmt(l.p99, 1)} ms, max ${fmt(l.max, 1)} ms`,
      );
    }
    const [at2k, at10k] = lat as [(typeof lat)[number], (typeof lat)[number]];

    record(
      {
        ingest_readings_per_s: mqttRate,
        ingest_ceiling_insert_per_s: rawRate,
        ingest_ratio: mqttRate / rawRate,
        ingest_insert_readings_per_s: directRate,
        ingest_insert_readings_ratio: mqttRate / directRate,
        copy_rows_per_s: copyRate,
        broker_only_msgs_per_s: brokerRate,
        commit_p50_ms: at2k.p50,
        commit_p95_ms: at2k.p95,
        commit_p99_ms: at2k.p99,
        commit_p50_ms_at_10k: at10k.p50,
        commit_p95_ms_at_10k: at10k.p95,
        commit_p99_ms_at_10k: at10k.p99,
      },
      [
        {
          what: "ingest, MQTT → committed row",
          value: mqttRate,
          unit: "readings/s",
          ceiling: rawRate,
          ceilingWhat: "multi-row INSERT",
          target: "≥ 100,000/s, ≥ 0.5",
        },
        {
          what: "ingest, MQTT → committed row",
          value: mqttRate,
          unit: "readings/s",
          ceiling: directRate,
          ceilingWhat: "insertReadings alone",
          target: "≥ 0.8",
        },
        { what: "insertReadings alone", value: directRate, unit: "readings/s", ceiling: rawRate, ceilingWhat: "multi-row INSERT" },
        { what: "multi-row INSERT", value: rawRate, unit: "rows/s", ceiling: copyRate, ceilingWhat: "COPY, one client" },
        { what: "ingest, messages", value: messages / mqttSeconds, unit: "msgs/s", ceiling: brokerRate, ceilingWhat: "aedes alone, QoS 1" },
        { what: "publish → commit p50 at 2k msgs/s", value: at2k.p50, unit: "ms" },
        { what: "publish → commit p95 at 2k msgs/s", value: at2k.p95, unit: "ms", target: "≤ 30 ms" },
        { what: "publish → commit p99 at 2k msgs/s", value: at2k.p99, unit: "ms" },
        { what: "publish → commit p95 at 10k msgs/s", value: at10k.p95, unit: "ms", target: "≤ 60 ms" },
      ],
    );
  } finally {
    if (service) await stopChild(service);
    await pool.end();
    stopCluster(CLUSTER);
  }
}

await main();
