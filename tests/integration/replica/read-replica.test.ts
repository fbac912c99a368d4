// A read replica of the test cluster (pg_basebackup, streaming on loopback) behind an app of this
// file's own: chart reads are served by the replica, a write and the read of it by the primary at
// once, and chart reads go back to the primary while the replica lags past the bound or is down.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { pgCtl, startReplica, stopCluster, type Replica } from "@/db/local-pg";
import { freePort } from "../../setup/global";
import { addMember, makeFarm, type TestFarm } from "../series/fixtures";
import { signInAt, type AppSession } from "./sign-in";

const root = path.resolve(import.meta.dirname, "../../..");
const clusterName = inject("clusterName");
const REPLICA = `${clusterName}-r`;
// The bound this file's app runs with: long enough for a few requests on a busy machine while
// replay is paused, short enough to wait out.
const MAX_LAG_MS = 8_000;

type SeriesAnswer = { series: { t: number[]; mean: number[] }[]; events: { kind: string; id: string }[] };

let replica: Replica;
let primary: pg.Client; // the worker's database on the primary
let standby: pg.Client; // the same database on the replica
let app: ChildProcess | null = null;
let base: string;
let farm: TestFarm;
let keeper: AppSession;
let dbName: string;

const until = async (what: string, ok: () => Promise<boolean>, ms = 30_000) => {
  const end = Date.now() + ms;
  while (!(await ok())) {
    if (Date.now() > end) throw new Error(`timed out waiting until ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
};

const chart = async (): Promise<SeriesAnswer> => {
  const res = await keeper.fetch(`/api/zones/${farm.zones.working}/series?metric=temperature`);
  expect(res.status).toBe(200);
  return (await res.json()) as SeriesAnswer;
};

// The replica's clock, so "since" compares times of one server.
const replicaNow = async () => (await standby.query<{ now: Date }>("select clock_timestamp() as now")).rows[0]!.now;

/** Whether a connection of the app's read pool ran a series query on the replica after `since`. */
const replicaReadSince = async (since: Date) => {
  const r = await standby.query(
    `select 1 from pg_stat_activity where application_name = 'wormward-read' and datname = $1
       and query ilike '%readings%' and query_start > $2`,
    [dbName, since],
  );
  return (r.rowCount ?? 0) > 0;
};

/** Asks for the chart until the replica is seen serving it. */
async function servedByReplica() {
  const since = await replicaNow();
  await until("a chart read is served by the replica", async () => {
    await chart();
    return replicaReadSince(since);
  });
}

const on = async (c: pg.Client, sql: string, params: unknown[] = []) => (await c.query(sql, params)).rows;

beforeAll(async () => {
  const port = process.env.WORMWARD_TEST_REPLICA_PORT ? Number(process.env.WORMWARD_TEST_REPLICA_PORT) : undefined;
  replica = await startReplica({ name: REPLICA, port, primary: { adminUrl: inject("adminUrl") } });
  const primaryUrl = process.env.DATABASE_URL!;
  dbName = new URL(primaryUrl).pathname.slice(1);
  const standbyUrl = new URL(primaryUrl);
  standbyUrl.port = String(replica.port);
  primary = new pg.Client({ connectionString: primaryUrl });
  standby = new pg.Client({ connectionString: standbyUrl.toString() });
  await primary.connect();

  farm = await makeFarm(primary, { zones: ["working"] });
  const email = await addMember(primary, farm.farmId, "keeper", "replica-test-pass");
  // An hour of readings, one a minute, for the chart to show.
  await primary.query(
    `insert into readings (probe_id, metric, ts, value)
     select $1, 'temperature', g, 21 from generate_series(now() - interval '1 hour', now() - interval '2 minutes', interval '1 minute') g`,
    [farm.probes[0]!.id],
  );
  standby.on("error", (err) => console.warn("the test's replica client:", err.message));
  await standby.connect();
  await until("the replica holds the farm", async () => (await on(standby, "select 1 from farms where id = $1", [farm.farmId])).length === 1);

  const appPort = await freePort();
  base = `http://127.0.0.1:${appPort}`;
  const log = fs.openSync(path.join(root, ".data", `${clusterName}-replica-web.log`), "w");
  app = spawn(path.join(root, "node_modules", ".bin", "next"), ["start", "-H", "127.0.0.1", "-p", String(appPort)], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: "production",
      DATABASE_URL: primaryUrl,
      DATABASE_REPLICA_URL: standbyUrl.toString(),
      REPLICA_MAX_LAG_MS: String(MAX_LAG_MS),
      REPLICA_CHECK_MS: "200",
      NEXTAUTH_SECRET: inject("nextauthSecret"),
      NEXTAUTH_URL: base,
      APP_URL: base,
      NEXT_TELEMETRY_DISABLED: "1",
      DEBUG: "wormward:replica",
    },
    stdio: ["ignore", log, log],
  });
  await until("the app answers", async () => (await fetch(`${base}/sign-in`).catch(() => null))?.ok === true, 60_000);
  keeper = await signInAt(base, email, "replica-test-pass");
});

afterAll(async () => {
  await standby?.query("select pg_wal_replay_resume()").catch(() => undefined);
  app?.kill("SIGTERM");
  await primary?.end();
  await standby?.end().catch(() => undefined);
  stopCluster(REPLICA);
});

describe("a read replica", () => {
  it("is a hot standby streaming from the primary that refuses writes", async () => {
    const streaming = await on(primary, "select state from pg_stat_replication where application_name = $1", [REPLICA]);
    expect(streaming).toEqual([{ state: "streaming" }]);
    expect(await on(standby, "select pg_is_in_recovery() as standby")).toEqual([{ standby: true }]);
    await expect(standby.query("insert into farms (name, timezone) values ('x', 'UTC')")).rejects.toMatchObject({ code: "25006" });
  });

  it("serves chart reads, while a write and the read of it go to the primary at once", async () => {
    await servedByReplica();
    // Replay stops: the replica keeps what it has while the primary moves on.
    await standby.query("select pg_wal_replay_pause()");
    await until("replay is paused", async () => (await on(standby, "select pg_get_wal_replay_pause_state() as s"))[0].s === "paused");
    await primary.query(`insert into readings (probe_id, metric, ts, value) values ($1, 'temperature', now() - interval '1 minute', 33.5)`, [
      farm.probes[0]!.id,
    ]);
    const logged = await keeper.fetch(`/api/bins/${farm.binId}/feedings`, {
      method: "POST",
      json: { zoneId: farm.zones.working, items: [{ name: "coffee grounds", massKg: 0.5, moisturePct: 60, nitrogenPct: 2, cn: 20 }] },
    });
    expect(logged.status).toBe(201);
    const feeding = ((await logged.json()) as { feeding: { id: string } }).feeding.id;

    // Read your write: the bin's feedings come from the primary and hold the new one at once.
    const feedings = (await (await keeper.fetch(`/api/bins/${farm.binId}/feedings`)).json()) as { feedings: { id: string }[] };
    expect(feedings.feedings.map((f) => f.id)).toContain(feeding);

    // The chart comes from the paused replica: neither the new reading nor the feeding's mark yet.
    const since = await replicaNow();
    const stale = await chart();
    expect(await replicaReadSince(since)).toBe(true);
    expect(stale.series[0]!.mean.length).toBeGreaterThan(50);
    expect(stale.series[0]!.mean).not.toContain(33.5);
    expect(stale.events.map((e) => e.id)).not.toContain(feeding);
    expect(await on(standby, "select 1 from readings where value = 33.5")).toEqual([]);
  });

  it("reads the primary once the replica lags past the bound, and the replica again once it catches up", async () => {
    // Still paused: after MAX_LAG_MS the chart shows what only the primary has.
    await until("the chart shows the primary's new reading", async () => (await chart()).series[0]!.mean.includes(33.5), MAX_LAG_MS + 20_000);
    expect((await on(standby, "select pg_get_wal_replay_pause_state() as s"))[0].s).toBe("paused");
    expect(await on(standby, "select 1 from readings where value = 33.5")).toEqual([]);

    await standby.query("select pg_wal_replay_resume()");
    await until("the replica replays the reading", async () => (await on(standby, "select 1 from readings where value = 33.5")).length === 1);
    await servedByReplica();
    const fresh = await chart();
    expect(fresh.series[0]!.mean).toContain(33.5);
    expect(fresh.events.map((e) => e.kind)).toEqual(["feeding"]);
  });

  it("a stopped replica takes neither a chart nor a page down", async () => {
    await servedByReplica();
    await standby.end();
    pgCtl(REPLICA, "stop");
    try {
      // The first read may still be sent to the replica: it fails there and is read on the primary.
      for (let i = 0; i < 3; i++) expect((await chart()).series[0]!.mean).toContain(33.5);
      const page = await keeper.fetch(`/farms/${farm.farmId}/zones/${farm.zones.working}`);
      expect(page.status).toBe(200);
      expect(await page.text()).toContain("33.5");
      expect(app!.exitCode).toBeNull();
    } finally {
      pgCtl(REPLICA, "start");
      standby = new pg.Client({ connectionString: replica.url.replace(/\/wormward$/, `/${dbName}`) });
      standby.on("error", (err) => console.warn("the test's replica client:", err.message));
      await standby.connect();
    }
    // Back up, it serves chart reads again.
    await servedByReplica();
  });
});
