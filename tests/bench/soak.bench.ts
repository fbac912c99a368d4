// `npm run bench -- soak` (not in the default run, not in CI): the multi-node layout under a steady
// load for SOAK_MINUTES (30 by default): Redis, two ingest nodes (`ingest/main.ts` each, sharing
// through Redis) behind HAProxy, one PostgreSQL; 100 probes publish a 4-reading report each, paced
// to SOAK_READINGS_PER_S (500) in all, through HAProxy. Measured in the first and the last window
// (a minute, or a quarter of the run when shorter): publish-to-PUBACK latency p50/p95 (the PUBACK
// leaves only after the commit, service.ts, so it bounds publish-to-commit from above) and the
// resident memory of each process. Memory is sampled every 5 s and a window's figure is the median
// of its samples: one sample moves by tens of MB with the garbage collector's rhythm. Node's heap
// grows to its working size in the first minutes of a load, so memory growth is also measured
// from the window that ends SOAK_WARMUP_MINUTES (5) in, and both figures are printed. And each node
// writes its live heap after a full collection every 30 s (memory-probe.ts): what a leak would grow.
// Printed and recorded (soak_* keys), never asserted.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { sql } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import { Redis } from "ioredis";
import { connectAsync, type MqttClient } from "mqtt";
import pg from "pg";
import { schema, type Db } from "@/db";
import { startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { bins, farms, probes, zones } from "@/db/schema";
import { probeBaseName } from "@/lib/domain/metrics";
import { hashToken } from "@/lib/server/auth/tokens";
import { startHaproxy, stopHaproxy } from "@/lib/stack/haproxy";
import { startRedis, stopRedis } from "@/lib/stack/redis-server";
import { BENCH_DIR, freePort, percentile, record, type Row } from "./report";

const MINUTES = Number(process.env.SOAK_MINUTES ?? 30);
const WARMUP_MINUTES = Number(process.env.SOAK_WARMUP_MINUTES ?? 5);
const READINGS_PER_S = Number(process.env.SOAK_READINGS_PER_S ?? 500);
const PROBES = 100;
const READINGS_PER_MESSAGE = 4; // temperature, moisture, ammonia, signal: one probe report
const CLUSTER = "pg-soak";
const root = path.resolve(import.meta.dirname, "../..");

// Each node's live heap after a full collection, every 30 s (memory-probe.ts).
const heapFile = (port: number) => path.join(BENCH_DIR, `soak-heap-${port}.jsonl`);
type HeapLine = { t: number; rss: number; heapUsed: number; heapTotal: number; external: number };
function heapLines(port: number): HeapLine[] {
  try {
    return fs
      .readFileSync(heapFile(port), "utf8")
      .split("\n")
      .filter(Boolean)
      .map((l) => JSON.parse(l) as HeapLine);
  } catch {
    return [];
  }
}

async function startNode(databaseUrl: string, redisUrl: string, port: number): Promise<ChildProcess> {
  fs.mkdirSync(BENCH_DIR, { recursive: true });
  fs.rmSync(heapFile(port), { force: true });
  const child = spawn(process.execPath, ["--expose-gc", "--import", "tsx", "--import", "./tests/bench/memory-probe.ts", "ingest/main.ts"], {
    cwd: root,
    env: {
      ...process.env,
      DATABASE_URL: databaseUrl,
      REDIS_URL: redisUrl,
      MQTT_PORT: String(port),
      MQTT_HOST: "127.0.0.1",
      MQTT_PROXY_PROTOCOL: "1",
      DEBUG: "",
      SOAK_MEMORY_FILE: heapFile(port),
    },
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

function stopNode(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    child.once("exit", () => resolve());
    child.kill("SIGTERM");
  });
}

/** Resident set size in MB (/proc/<pid>/status VmRSS), or null when the process is gone. */
function rssMb(pid: number | undefined): number | null {
  if (!pid) return null;
  try {
    const kb = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"))?.[1];
    return kb ? Number(kb) / 1024 : null;
  } catch {
    return null;
  }
}
const pidFile = (rel: string) => {
  try {
    return Number(fs.readFileSync(path.join(root, ".data", rel), "utf8").trim());
  } catch {
    return undefined;
  }
};

type BenchProbe = { id: number; code: string; token: string };

async function setUpProbes(d: Db): Promise<BenchProbe[]> {
  const [farm] = await d.insert(farms).values({ name: "Soak farm" }).returning();
  const [bin] = await d.insert(bins).values({ farmId: farm!.id, name: "Soak bed", style: "bed", species: "eisenia-fetida" }).returning();
  const zoneRows = await d
    .insert(zones)
    .values(Array.from({ length: 10 }, (_, i) => ({ binId: bin!.id, position: i + 1, kind: "working" as const })))
    .returning();
  const out: BenchProbe[] = [];
  for (let i = 0; i < PROBES; i++) {
    const code = `soak-${i}`;
    const token = `soak-token-${i}-${Math.random().toString(36).slice(2)}`;
    const [p] = await d
      .insert(probes)
      .values({ farmId: farm!.id, zoneId: zoneRows[i % zoneRows.length]!.id, code, tokenHash: hashToken(token) })
      .returning();
    out.push({ id: p!.id, code, token });
  }
  return out;
}

// Values inside every rule's comfortable range: the rule runner evaluates each batch's zones and
// raises nothing, as on a quiet farm.
function report(code: string, seconds: number, k: number): string {
  return JSON.stringify([
    { bn: probeBaseName(code), bt: seconds, n: "temp", u: "Cel", v: 20 + (k % 30) / 10 },
    { n: "moisture", u: "/100", v: 72 + (k % 50) / 10 },
    { n: "nh3", u: "ppm", v: (k % 10) / 10 },
    { n: "rssi", u: "dBm", v: -60 - (k % 30) },
  ]);
}

const fmt = (n: number | null, digits = 0) => (n == null ? "—" : n.toLocaleString("en-US", { maximumFractionDigits: digits, minimumFractionDigits: digits }));

async function main() {
  const cluster = await startCluster({ name: CLUSTER, port: Number(process.env.SOAK_PG_PORT ?? 54359) });
  const admin = new pg.Client({ connectionString: cluster.adminUrl });
  await admin.connect();
  await admin.query("drop database if exists soak with (force)");
  await admin.query("create database soak");
  await admin.end();
  const url = cluster.adminUrl.replace(/\/postgres$/, "/soak");
  await runMigrations(url);
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  const d = drizzle(pool, { schema });
  const nodes: ChildProcess[] = [];
  const clients: MqttClient[] = [];
  try {
    const fleet = await setUpProbes(d);
    const redis = await startRedis({ name: "redis-soak", port: await freePort() });
    // Keys of an earlier run (sessions, presence) would only add to what is measured.
    const r = new Redis(redis.url);
    await r.flushall();
    await r.quit();
    const ports = [await freePort(), await freePort()];
    for (const port of ports) nodes.push(await startNode(url, redis.url, port));
    const front = await freePort();
    await startHaproxy({ name: "haproxy-soak", port: front, backends: ports.map((port, i) => ({ name: `node-${i + 1}`, port })), sendProxy: true });
    console.log(
      `Wormward soak: ${MINUTES} min at ${READINGS_PER_S} readings/s from ${PROBES} probes through HAProxy (127.0.0.1:${front}) to two ingest nodes sharing Redis ${redis.port}; ${os.cpus().length} CPU(s), Node ${process.version}`,
    );

    for (const p of fleet) {
      const c = await connectAsync(`mqtt://127.0.0.1:${front}`, {
        clientId: p.code,
        username: p.code,
        password: p.token,
        protocolVersion: 4,
        reconnectPeriod: 0,
      });
      c.on("error", (err) => console.error(`probe ${p.code}: ${err.message}`));
      clients.push(c);
    }

    const processes = { node1: nodes[0]!.pid, node2: nodes[1]!.pid, redis: pidFile("redis-soak/redis.pid"), haproxy: pidFile("haproxy-soak/haproxy.pid") };
    const memory = () => Object.fromEntries(Object.entries(processes).map(([k, pid]) => [k, rssMb(pid)])) as Record<keyof typeof processes, number | null>;

    const durationMs = MINUTES * 60_000;
    const windowMs = Math.min(60_000, durationMs / 4);
    const messagesPerS = READINGS_PER_S / READINGS_PER_MESSAGE;
    const latencies: { at: number; ms: number }[] = [];
    const pending = new Set<Promise<void>>();
    let sent = 0;
    let failed = 0;
    const seq = new Array<number>(PROBES).fill(0);
    // Each probe's reports one second apart from 4 h ago (never ahead of now, whatever the length).
    const base = Math.floor(Date.now() / 1000) - 4 * 3600 - Math.ceil((durationMs / 1000) * (messagesPerS / PROBES));
    type Mem = ReturnType<typeof memory>;
    const samples: { at: number; mem: Mem }[] = [];
    const t0 = performance.now();
    const wall0 = Date.now();
    let lastPrint = t0;
    let lastSample = -Infinity;
    const minutes: { at_s: number; p50: number | null; p95: number | null }[] = [];
    while (performance.now() - t0 < durationMs) {
      const elapsed = performance.now() - t0;
      const due = Math.floor((elapsed / 1000) * messagesPerS);
      for (; sent < due; sent++) {
        const i = sent % PROBES;
        const p = fleet[i]!;
        const k = seq[i]!++;
        const at = performance.now();
        const pr: Promise<void> = clients[i]!.publishAsync(`wormward/${p.code}/readings`, report(p.code, base + k, k), { qos: 1 })
          .then(
            () => void latencies.push({ at: at - t0, ms: performance.now() - at }),
            () => void failed++,
          )
          .finally(() => pending.delete(pr));
        pending.add(pr);
      }
      if (elapsed - lastSample >= 5_000) {
        lastSample = elapsed;
        samples.push({ at: elapsed, mem: memory() });
      }
      if (performance.now() - lastPrint >= 60_000) {
        lastPrint = performance.now();
        const m = samples.at(-1)!.mem;
        // This minute's publish→PUBACK, so the first and last windows can be read against the spread between minutes.
        const minute = latencies.filter((l) => l.at >= elapsed - 60_000).map((l) => l.ms);
        const p50 = percentile(minute, 50);
        const p95 = percentile(minute, 95);
        minutes.push({ at_s: Math.round(elapsed / 1000), p50, p95 });
        console.log(
          `  ${fmt(elapsed / 60_000, 1)} min: ${fmt(sent)} messages, ${pending.size} awaiting PUBACK, p50 ${fmt(p50, 1)} / p95 ${fmt(p95, 1)} ms, RSS node1 ${fmt(m.node1, 0)} MB, node2 ${fmt(m.node2, 0)} MB`,
        );
      }
      await new Promise((r) => setTimeout(r, 10));
    }
    samples.push({ at: performance.now() - t0, mem: memory() });
    await Promise.all(pending);
    const elapsedS = (performance.now() - t0) / 1000;
    const stored = (await d.execute<{ n: number }>(sql`select count(*)::int as n from readings`)).rows[0]!.n;

    const startMs = latencies.filter((l) => l.at < windowMs).map((l) => l.ms);
    const endMs = latencies.filter((l) => l.at >= durationMs - windowMs).map((l) => l.ms);
    const lat = {
      p50Start: percentile(startMs, 50),
      p95Start: percentile(startMs, 95),
      p50End: percentile(endMs, 50),
      p95End: percentile(endMs, 95),
    };
    type Key = keyof typeof processes;
    const keys = Object.keys(processes) as Key[];
    // Median of a process's samples in [from, to): the window's resident memory.
    const windowMem = (from: number, to: number): Record<Key, number | null> =>
      Object.fromEntries(
        keys.map((k) => {
          const v = samples.filter((s) => s.at >= from && s.at < to && s.mem[k] != null).map((s) => s.mem[k]!);
          return [k, v.length ? percentile(v, 50) : null];
        }),
      ) as Record<Key, number | null>;
    const warmupMs = Math.min(WARMUP_MINUTES * 60_000, durationMs / 2);
    const memStart = windowMem(0, windowMs);
    const memWarm = windowMem(Math.max(0, warmupMs - windowMs), warmupMs);
    const memEnd = windowMem(durationMs - windowMs, Infinity);
    const pct = (from: number | null, to: number | null) => (from && to ? ((to - from) / from) * 100 : null);
    const growth = (k: Key) => pct(memStart[k], memEnd[k]);
    const growthWarm = (k: Key) => pct(memWarm[k], memEnd[k]);
    // Live heap after a full collection: the median of a node's 30 s lines in the first and the last
    // 3 minutes (a quarter of the run when shorter).
    const heapWindowMs = Math.min(3 * 60_000, durationMs / 4);
    const heapMb = (port: number, from: number, to: number) => {
      const v = heapLines(port)
        .filter((l) => l.t - wall0 >= from && l.t - wall0 < to)
        .map((l) => l.heapUsed / 2 ** 20);
      return v.length ? percentile(v, 50) : null;
    };
    const heap = ports.map((port, i) => ({
      node: `node${i + 1}`,
      start: heapMb(port, 0, heapWindowMs),
      end: heapMb(port, durationMs - heapWindowMs, Infinity),
    }));
    const expected = sent * READINGS_PER_MESSAGE;
    console.log(
      `\nSent ${fmt(sent)} messages (${fmt(expected)} readings) in ${fmt(elapsedS, 1)} s: ${fmt(expected / elapsedS)} readings/s; stored ${fmt(stored)}, ${failed} publish(es) failed` +
        `\npublish → PUBACK (after the commit), first ${fmt(windowMs / 1000)} s: p50 ${fmt(lat.p50Start, 1)} ms, p95 ${fmt(lat.p95Start, 1)} ms; last ${fmt(windowMs / 1000)} s: p50 ${fmt(lat.p50End, 1)} ms, p95 ${fmt(lat.p95End, 1)} ms` +
        `\nRSS, median of the 5 s samples, first ${fmt(windowMs / 1000)} s → last (MB): ${keys
          .map((k) => `${k} ${fmt(memStart[k], 1)} → ${fmt(memEnd[k], 1)} (${fmt(growth(k), 1)} %)`)
          .join(", ")}` +
        `\nRSS, the window ending at ${fmt(warmupMs / 60_000, 1)} min (warmed up) → last (MB): ${keys
          .map((k) => `${k} ${fmt(memWarm[k], 1)} → ${fmt(memEnd[k], 1)} (${fmt(growthWarm(k), 1)} %)`)
          .join(", ")}` +
        `\nLive heap after a full collection, median of the first ${fmt(heapWindowMs / 60_000, 1)} min → the last (MB): ${heap
          .map((h) => `${h.node} ${fmt(h.start, 1)} → ${fmt(h.end, 1)} (${fmt(pct(h.start, h.end), 1)} %)`)
          .join(", ")}`,
    );

    const rows: Row[] = [
      {
        what: "soak: readings/s achieved",
        value: expected / elapsedS,
        unit: "readings/s",
        ceiling: READINGS_PER_S,
        ceilingWhat: "asked",
        target: "500 readings/s",
      },
      { what: "soak: stored readings", value: stored, unit: "rows", ceiling: expected, ceilingWhat: "sent", target: "all of them" },
      { what: "soak: publish→PUBACK p50, end", value: lat.p50End, unit: "ms", ceiling: lat.p50Start, ceilingWhat: "start", target: "unchanged within noise" },
      { what: "soak: publish→PUBACK p95, end", value: lat.p95End, unit: "ms", ceiling: lat.p95Start, ceilingWhat: "start", target: "unchanged within noise" },
      ...keys.map((k) => ({
        what: `soak: RSS ${k}, end`,
        value: memEnd[k],
        unit: "MB",
        ceiling: memWarm[k],
        ceilingWhat: `at ${fmt(warmupMs / 60_000, 1)} min`,
        target: "growth under 10 %",
      })),
      ...heap.map((h) => ({
        what: `soak: live heap ${h.node}, end`,
        value: h.end,
        unit: "MB",
        ceiling: h.start,
        ceilingWhat: "first minutes",
        target: "growth under 10 %",
      })),
    ];
    // Every sample, for a plot or a second look at the trend.
    fs.mkdirSync(BENCH_DIR, { recursive: true });
    fs.writeFileSync(path.join(BENCH_DIR, "soak-rss.json"), JSON.stringify(samples.map((s) => ({ at_s: Math.round(s.at / 1000), ...s.mem }))));
    fs.writeFileSync(path.join(BENCH_DIR, "soak-latency.json"), JSON.stringify(minutes));
    const p95s = minutes.map((x) => x.p95).filter((x): x is number => x != null);
    if (p95s.length)
      console.log(`Spread of the minutes' p95: ${fmt(Math.min(...p95s), 1)}–${fmt(Math.max(...p95s), 1)} ms, median ${fmt(percentile(p95s, 50), 1)} ms`);
    record(
      {
        soak_minutes: MINUTES,
        soak_readings_per_s: expected / elapsedS,
        soak_sent_readings: expected,
        soak_stored_readings: stored,
        soak_failed_publishes: failed,
        soak_p50_start_ms: lat.p50Start,
        soak_p95_start_ms: lat.p95Start,
        soak_p50_end_ms: lat.p50End,
        soak_p95_end_ms: lat.p95End,
        soak_warmup_minutes: warmupMs / 60_000,
        ...Object.fromEntries(
          keys.flatMap((k) => [
            [`soak_rss_${k}_start_mb`, memStart[k]],
            [`soak_rss_${k}_warm_mb`, memWarm[k]],
            [`soak_rss_${k}_end_mb`, memEnd[k]],
            [`soak_rss_${k}_growth_pct`, growth(k)],
            [`soak_rss_${k}_growth_after_warmup_pct`, growthWarm(k)],
          ]),
        ),
        ...Object.fromEntries(
          heap.flatMap((h) => [
            [`soak_heap_${h.node}_start_mb`, h.start],
            [`soak_heap_${h.node}_end_mb`, h.end],
            [`soak_heap_${h.node}_growth_pct`, pct(h.start, h.end)],
          ]),
        ),
      },
      rows,
    );
  } finally {
    await Promise.all(clients.map((c) => c.endAsync().catch(() => {})));
    for (const n of nodes) await stopNode(n);
    stopHaproxy("haproxy-soak");
    stopRedis("redis-soak");
    await pool.end();
    stopCluster(CLUSTER);
  }
}

await main();
