// `npm run bench series`: the chart series API on a readings table of about 10 million rows,
// printed, never asserted. Starts a throwaway PostgreSQL cluster ("pg-bench-series", port
// WORMWARD_BENCH_SERIES_PG_PORT or 54364), migrates it (readings partitioned by month), and loads in
// SQL (generate_series): a year of one-minute temperature and moisture for the 3 probes of one zone
// (3.15 M rows) and 30 days of one-minute readings of 4 metrics for 40 more probes of the farm
// (6.9 M rows); the hourly rollups from them, and the daily ones by the deferred refresh the ingest
// service runs (lib/server/series/maintenance.ts). Then `next start` of the current build (`.next`,
// built here when a source changed since, as npm start does) against that database, a signed-in owner, and:
//  - GET /api/zones/<zone>/series?metric=…&from=…&to=… for 24 h, 7 d, 30 d and 1 y, alternating
//    temperature and moisture (3 probes a line each): p50/p95 per range over RUNS requests through
//    HTTP, after a few warm-up requests;
//  - the same year of the same zone as raw readings bucketed by day in SQL (no HTTP, so the ratio
//    flatters raw): p50/p95 over RAW_RUNS.
// The EXPLAIN (ANALYZE) of each range's statement is printed for the reader.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { sql } from "drizzle-orm";
import pg from "pg";
import { startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";
import { hashPassword } from "@/lib/server/auth/password";
import { buildUnlessCurrent } from "@/lib/stack/build-cache";
import { freePort, record } from "./report";

const CLUSTER = "pg-bench-series";
const ZONE_PROBES = 3;
const FARM_PROBES = 40;
const FARM_DAYS = 30;
const RUNS = Number(process.env.WORMWARD_BENCH_SERIES_RUNS ?? 60);
const RAW_RUNS = Number(process.env.WORMWARD_BENCH_SERIES_RAW_RUNS ?? 8);
const WARMUP = 5;
const DAY = 86_400_000;
const PASSWORD = "bench-series-password";
const root = path.resolve(import.meta.dirname, "../..");

const fmt = (n: number, digits = 0) => n.toLocaleString("en-US", { maximumFractionDigits: digits, minimumFractionDigits: digits });
const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil((p / 100) * s.length) - 1)]!;
};

async function timed<T>(what: string, fn: () => Promise<T>): Promise<T> {
  const t0 = performance.now();
  const r = await fn();
  console.log(`  ${what}: ${fmt((performance.now() - t0) / 1000, 1)} s`);
  return r;
}

/** `next start` of the current build against the bench database, as the test harness starts it. */
async function startApp(databaseUrl: string): Promise<{ url: string; child: ChildProcess }> {
  // The build npm start and npm test use, made only when a source it reads has changed.
  buildUnlessCurrent(root, () => {
    console.log("Building the web app (next build)…");
    const r = spawnSync(path.join(root, "node_modules", ".bin", "next"), ["build"], {
      cwd: root,
      stdio: "inherit",
      env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" },
    });
    if (r.status !== 0) throw new Error("next build failed");
  });
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const log = fs.openSync(path.join(root, ".data", `${CLUSTER}-web.log`), "w");
  const child = spawn(path.join(root, "node_modules", ".bin", "next"), ["start", "-H", "127.0.0.1", "-p", String(port)], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: "production",
      DATABASE_URL: databaseUrl,
      NEXTAUTH_SECRET: "bench-secret-0123456789abcdef",
      NEXTAUTH_URL: url,
      APP_URL: url,
      NEXT_TELEMETRY_DISABLED: "1",
    },
    stdio: ["ignore", log, log],
  });
  const until = Date.now() + 90_000;
  for (;;) {
    try {
      if ((await fetch(`${url}/sign-in`)).ok) break;
    } catch {
      /* starting */
    }
    if (Date.now() > until) throw new Error(`next start did not come up; see .data/${CLUSTER}-web.log`);
    await new Promise((r) => setTimeout(r, 250));
  }
  return { url, child };
}

/** next-auth's credentials flow, as a browser signs in: the session cookie header. */
async function signIn(base: string, email: string): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair!.indexOf("=");
      jar.set(pair!.slice(0, i), pair!.slice(i + 1));
    }
  };
  const header = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrf = await fetch(`${base}/api/auth/csrf`);
  keep(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: header() },
    body: new URLSearchParams({ csrfToken, email, password: PASSWORD, json: "true" }),
  });
  await res.text();
  keep(res);
  if (![...jar.keys()].some((k) => k.includes("session-token"))) throw new Error(`bench sign-in failed (${res.status})`);
  return header();
}

async function main() {
  const cluster = await startCluster({ name: CLUSTER, port: Number(process.env.WORMWARD_BENCH_SERIES_PG_PORT ?? 54364) });
  const admin = new pg.Client({ connectionString: cluster.adminUrl });
  await admin.connect();
  // WORMWARD_BENCH_SERIES_KEEP=1 reuses the readings a previous run loaded (a rerun of the timing).
  const keep = process.env.WORMWARD_BENCH_SERIES_KEEP === "1" && (await admin.query(`select 1 from pg_database where datname = 'series_bench'`)).rowCount === 1;
  if (!keep) {
    await admin.query("drop database if exists series_bench with (force)");
    await admin.query("create database series_bench");
  }
  await admin.end();
  const url = cluster.adminUrl.replace(/\/postgres$/, "/series_bench");
  await runMigrations(url);
  process.env.DATABASE_URL = url;
  // Imported after DATABASE_URL is set: the app's one pool reads it on first use.
  const { db, closeDb } = await import("@/db");
  const { bucketedReadingSql, dailyPointsSql, listBucketedReadingPoints } = await import("@/db/queries/series");
  const { getZoneSeries } = await import("@/lib/server/series/zone-series");
  const { runSeriesMaintenance } = await import("@/lib/server/series/maintenance");

  const c = new pg.Client({ connectionString: url });
  await c.connect();
  let app: { url: string; child: ChildProcess } | null = null;
  try {
    await c.query("set synchronous_commit = off");
    const kept = keep
      ? (
          await c.query(`select z.id as zone, array_agg(p.id order by p.id) as ids, (select max(ts) + interval '1 minute' from readings where probe_id = min(p.id)) as end
                        from zones z join probes p on p.zone_id = z.id join bins b on b.id = z.bin_id where b.name = 'Bench bin' and z.position = 1 group by z.id`)
        ).rows[0]
      : null;
    const { zoneId, ids, end } = kept ? { zoneId: kept.zone as string, ids: kept.ids as number[], end: kept.end as Date } : await load();
    if (kept) console.log(`Reusing the readings loaded before (up to ${end.toISOString()})`);
    async function load() {
      const farmId = (await c.query(`insert into farms (name, timezone) values ('Bench farm', 'Europe/London') returning id`)).rows[0].id as string;
      const binId = (await c.query(`insert into bins (farm_id, name, style, species) values ($1, 'Bench bin', 'bed', 'eisenia-fetida') returning id`, [farmId]))
        .rows[0].id as string;
      const zoneId = (await c.query(`insert into zones (bin_id, position, kind) values ($1, 1, 'working') returning id`, [binId])).rows[0].id as string;
      const otherZone = (await c.query(`insert into zones (bin_id, position, kind) values ($1, 2, 'curing') returning id`, [binId])).rows[0].id as string;
      const probe = async (zone: string, code: string) =>
        (
          await c.query(`insert into probes (farm_id, zone_id, code, token_hash, metrics) values ($1, $2, $3, 'x', '{temperature,moisture}') returning id`, [
            farmId,
            zone,
            code,
          ])
        ).rows[0].id as number;
      const ids: number[] = [];
      for (let i = 0; i < ZONE_PROBES; i++) ids.push(await probe(zoneId, `bench-series-${i}`));
      const others: number[] = [];
      for (let i = 0; i < FARM_PROBES; i++) others.push(await probe(otherZone, `bench-farm-${i}`));
      const userId = (
        await c.query(`insert into users (email, name, password_hash) values ('bench@example.org', 'Bench', $1) returning id`, [await hashPassword(PASSWORD)])
      ).rows[0].id as string;
      await c.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'owner')`, [userId, farmId]);

      const end = new Date(Math.floor(Date.now() / 60_000) * 60_000);
      const yearStart = new Date(end.getTime() - 365 * DAY);
      console.log(`Loading readings (${ZONE_PROBES} probes × 2 metrics × a year, ${FARM_PROBES} probes × 4 metrics × ${FARM_DAYS} days, one a minute):`);
      // A daily swing and a slow seasonal drift; moisture apart from temperature.
      const value = `case when m = 'temperature' then 20 + 3 * sin(extract(epoch from t) / 13751) + 4 * sin(extract(epoch from t) / 5022000) + p % 5
                   else 70 + 5 * sin(extract(epoch from t) / 90000 + p) end`;
      await timed("a year for the zone's probes", async () => {
        for (const id of ids) {
          await c.query(
            `insert into readings (probe_id, metric, ts, value)
           select p, m, t, ${value} from (select $1::int as p) x, unnest('{temperature,moisture}'::metric[]) m,
             generate_series($2::timestamptz, $3::timestamptz - interval '1 minute', interval '1 minute') t`,
            [id, yearStart.toISOString(), end.toISOString()],
          );
        }
      });
      await timed(`${FARM_DAYS} days for the farm's other probes`, async () => {
        for (const id of others) {
          await c.query(
            `insert into readings (probe_id, metric, ts, value)
           select p, m, t, ${value} from (select $1::int as p) x, unnest('{temperature,moisture,ammonia,signal}'::metric[]) m,
             generate_series($2::timestamptz, $3::timestamptz - interval '1 minute', interval '1 minute') t`,
            [id, new Date(end.getTime() - FARM_DAYS * DAY).toISOString(), end.toISOString()],
          );
        }
      });
      await timed("hourly rollups", () =>
        c.query(`insert into reading_rollups (probe_id, metric, hour, min, max, sum, count)
               select probe_id, metric, date_trunc('hour', ts, 'UTC'), min(value), max(value), sum(value), count(*) from readings group by 1, 2, 3`),
      );
      await timed("daily rollups (the deferred refresh)", () => runSeriesMaintenance({ retentionMonths: null }));
      await timed("vacuum analyze", () => c.query("vacuum analyze"));
      return { zoneId, ids, end };
    }
    const rows = (await c.query(`select count(*)::int as n from readings`)).rows[0].n as number;
    const parts = (await c.query(`select count(*)::int as n from pg_inherits where inhparent = 'public.readings'::regclass`)).rows[0].n as number;
    console.log(`  ${fmt(rows)} readings in ${parts} partitions`);

    // What each range's statement does, for the reader (the route's own SQL builders).
    const explain = async (label: string, statement: ReturnType<typeof sql>) => {
      const r = await db().execute<{ "QUERY PLAN": string }>(sql`explain (analyze, costs off, summary on) ${statement}`);
      console.log(`\nEXPLAIN ${label}:\n${r.rows.map((x) => `  ${x["QUERY PLAN"]}`).join("\n")}`);
    };
    const range = (days: number) => ({ metric: "temperature" as const, from: new Date(end.getTime() - days * DAY), to: end });
    await explain("24 h (raw readings, 2-minute buckets)", bucketedReadingSql(ids, range(1), 120, "probe"));
    await explain("1 y (daily rollups + hourly for today)", dailyPointsSql(ids, range(365), "Europe/London"));
    await explain("1 y on raw readings (day buckets)", bucketedReadingSql(ids, range(365), 86_400, "probe"));

    app = await startApp(url);
    const cookie = await signIn(app.url, "bench@example.org");
    const figures: Record<string, number> = {};
    const table: { label: string; p50: number; p95: number }[] = [];
    for (const [label, days] of [
      ["24h", 1],
      ["7d", 7],
      ["30d", 30],
      ["1y", 365],
    ] as const) {
      const from = new Date(end.getTime() - days * DAY).toISOString();
      const ask = async (metric: string) => {
        const t0 = performance.now();
        const res = await fetch(`${app!.url}/api/zones/${zoneId}/series?metric=${metric}&from=${from}&to=${end.toISOString()}`, { headers: { cookie } });
        const body = (await res.json()) as { series?: { t: number[] }[]; source?: string; bucketSeconds?: number };
        const ms = performance.now() - t0;
        if (!res.ok || body.series?.length !== ZONE_PROBES) throw new Error(`series ${label} ${metric}: ${res.status} ${JSON.stringify(body).slice(0, 200)}`);
        return { ms, points: body.series.reduce((n, s) => n + s.t.length, 0), level: `${body.source}/${body.bucketSeconds ?? "-"}` };
      };
      for (let i = 0; i < WARMUP; i++) await ask(i % 2 ? "moisture" : "temperature");
      const ms: number[] = [];
      let seen = { points: 0, level: "" };
      for (let i = 0; i < RUNS; i++) {
        const r = await ask(i % 2 ? "moisture" : "temperature");
        ms.push(r.ms);
        seen = r;
      }
      figures[`series_p50_ms_${label}`] = pct(ms, 50);
      figures[`series_p95_ms_${label}`] = pct(ms, 95);
      table.push({ label, p50: pct(ms, 50), p95: pct(ms, 95) });
      console.log(`series ${label}: p50 ${fmt(pct(ms, 50), 1)} ms, p95 ${fmt(pct(ms, 95), 1)} ms over ${RUNS} requests (${seen.level}, ${seen.points} points)`);
    }
    // Where the time goes: the same answers without HTTP (the use case the route calls), and an
    // authenticated request of the same route family that reads one row (GET /api/zones/<zone>).
    const floor: number[] = [];
    for (let i = 0; i < RUNS + WARMUP; i++) {
      const t0 = performance.now();
      const res = await fetch(`${app.url}/api/zones/${zoneId}`, { headers: { cookie } });
      await res.text();
      if (!res.ok) throw new Error(`GET /api/zones/${zoneId}: ${res.status}`);
      if (i >= WARMUP) floor.push(performance.now() - t0);
    }
    figures.series_http_floor_p50_ms = pct(floor, 50);
    figures.series_http_floor_p95_ms = pct(floor, 95);
    console.log(`HTTP floor (GET /api/zones/<zone>, signed in): p50 ${fmt(pct(floor, 50), 1)} ms, p95 ${fmt(pct(floor, 95), 1)} ms`);
    for (const [label, days] of [
      ["24h", 1],
      ["7d", 7],
      ["30d", 30],
      ["1y", 365],
    ] as const) {
      const ms: number[] = [];
      for (let i = 0; i < RUNS + WARMUP; i++) {
        const t0 = performance.now();
        await getZoneSeries(zoneId, { metric: i % 2 ? "moisture" : "temperature", from: new Date(end.getTime() - days * DAY), to: end });
        if (i >= WARMUP) ms.push(performance.now() - t0);
      }
      figures[`series_usecase_p50_ms_${label}`] = pct(ms, 50);
      figures[`series_usecase_p95_ms_${label}`] = pct(ms, 95);
      console.log(`use case alone ${label}: p50 ${fmt(pct(ms, 50), 1)} ms, p95 ${fmt(pct(ms, 95), 1)} ms`);
    }
    const raw: number[] = [];
    for (let i = 0; i < RAW_RUNS + 1; i++) {
      const t0 = performance.now();
      await listBucketedReadingPoints(ids, { ...range(365), metric: i % 2 ? "moisture" : "temperature" }, 86_400, "probe");
      if (i > 0) raw.push(performance.now() - t0);
    }
    figures.series_raw_p50_ms_1y = pct(raw, 50);
    figures.series_raw_p95_ms_1y = pct(raw, 95);
    console.log(`raw 1 y (SQL, day buckets): p50 ${fmt(pct(raw, 50), 1)} ms, p95 ${fmt(pct(raw, 95), 1)} ms over ${RAW_RUNS} runs`);
    figures.series_readings = rows;
    record(
      figures,
      table.map((t) => ({
        what: `series ${t.label} p95 (HTTP, ${fmt(rows / 1e6, 1)} M readings)`,
        value: t.p95,
        unit: "ms",
        ...(t.label === "1y"
          ? { ceiling: figures.series_raw_p95_ms_1y, ceilingWhat: "raw 1 y in SQL", target: "≤ 20 ms, ≤ 0.2 of raw" }
          : { target: "≤ 20 ms" }),
      })),
    );
  } finally {
    app?.child.kill("SIGTERM");
    await c.end();
    await closeDb();
    stopCluster(CLUSTER);
  }
}

await main();
