// PostgreSQL stopped for 10 s in the middle of a QoS 1 stream: the ingest stops acknowledging,
// keeps retrying, and recovers by itself when the database is back; nothing is lost.
// A cluster of its own: the shared test cluster serves other files running at the same time.
import { drizzle } from "drizzle-orm/node-postgres";
import type { MqttClient } from "mqtt";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { schema, type Db } from "@/db";
import { pgCtl, startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { startIngest, type Ingest } from "@/ingest/service";
import { connectProbe, countReadings, createProbes, freePort, tempPack, type TestProbe } from "./helpers";

const CLUSTER = "pg-outage";
const MESSAGES = 1500;
const WINDOW = 100;

let pool: pg.Pool;
let d: Db;
let ingest: Ingest | null = null;
let client: MqttClient | null = null;
let probe: TestProbe;

beforeAll(async () => {
  // A free port, not a fixed one: another cluster or service on this machine may hold any given port.
  const cluster = await startCluster({ name: CLUSTER, port: await freePort() });
  const admin = new pg.Client({ connectionString: cluster.adminUrl });
  await admin.connect();
  await admin.query("drop database if exists outage_test with (force)");
  await admin.query("create database outage_test");
  await admin.end();
  const url = cluster.adminUrl.replace(/\/postgres$/, "/outage_test");
  await runMigrations(url);
  // One handle for the test's own queries and the ingest, as ingest/main.ts hands it one.
  pool = new pg.Pool({ connectionString: url, max: 5, connectionTimeoutMillis: 5000 });
  pool.on("error", () => {}); // its idle clients die with the server on purpose
  d = drizzle(pool, { schema });
  [probe] = (await createProbes(1, { d })) as [TestProbe];
  ingest = await startIngest({ port: 0, db: d, retry: { minMs: 100, maxMs: 1000 } });
});

afterAll(async () => {
  await client?.endAsync(true);
  await ingest?.close();
  await pool?.end();
  stopCluster(CLUSTER);
});

describe("PostgreSQL down for 10 s mid-stream", () => {
  it("acknowledges nothing while it is down and loses nothing", async () => {
    client = await connectProbe(ingest!.port, probe, { clean: false, reconnectPeriod: 500 });
    client.on("error", () => {});
    const start = Math.floor(Date.now() / 1000) - 3600;
    const ackTimes: number[] = [];
    const outage = { from: 0, to: 0 };
    const inFlight = new Set<Promise<void>>();

    for (let i = 0; i < MESSAGES; i++) {
      while (inFlight.size >= WINDOW) await Promise.race(inFlight);
      const p: Promise<void> = client
        .publishAsync(`wormward/${probe.code}/readings`, tempPack(probe.code, start + i, 20 + (i % 50) / 10), { qos: 1 })
        .then(() => {
          ackTimes.push(Date.now());
        })
        .finally(() => inFlight.delete(p));
      inFlight.add(p);
      if (outage.from === 0 && ackTimes.length >= MESSAGES / 3) {
        pgCtl(CLUSTER, "stop");
        outage.from = Date.now();
        setTimeout(() => {
          outage.to = Date.now();
          pgCtl(CLUSTER, "start");
        }, 10_000);
      }
    }
    await Promise.all(inFlight);

    expect(outage.to - outage.from).toBeGreaterThanOrEqual(10_000);
    expect(ackTimes).toHaveLength(MESSAGES);
    // No PUBACK while the database was away: every ack before the stop or after the restart.
    expect(ackTimes.filter((t) => t > outage.from && t < outage.to)).toEqual([]);
    expect(ackTimes.filter((t) => t >= outage.to).length).toBeGreaterThan(0);
    expect(ingest!.stats().retries).toBeGreaterThan(0);
    expect(await countReadings([probe.id], d)).toEqual({ rows: MESSAGES, distinct: MESSAGES, rolled: MESSAGES });
  }, 120_000);
});
