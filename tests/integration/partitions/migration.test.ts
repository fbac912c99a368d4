// Migration 0007 moves an unpartitioned readings table (as every database before it has one) into
// the table partitioned by month with pg_partman; then pg_partman's maintenance makes months
// ahead and, with a retention, drops old months of raw readings while the rollups stay.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { schema } from "@/db";
import { migrationsFolder, runMigrations } from "@/db/migrate";
import { listReadingPartitions, runPartitionMaintenance } from "@/db/queries/partitions";

const NAME = `wormward_partition_move_${process.env.VITEST_POOL_ID ?? "0"}`;
const adminUrl = inject("adminUrl");
const url = adminUrl.replace(/\/postgres$/, `/${NAME}`);
const DAY = 86_400_000;
const monthStart = (t: Date, add = 0) => new Date(Date.UTC(t.getUTCFullYear(), t.getUTCMonth() + add, 1));

let pool: pg.Pool;
let before: { n: number; total: number };
let tmp: string;
const now = new Date();
// Three months of readings every 10 minutes for two probes, one exactly on each month's first
// instant and one a millisecond before it, and one from 2001 (older than the 5 years of months made).
const from = new Date(monthStart(now, -2).getTime() - 5 * DAY);

async function admin(q: string) {
  const c = new pg.Client({ connectionString: adminUrl });
  await c.connect();
  try {
    await c.query(q);
  } finally {
    await c.end();
  }
}

beforeAll(async () => {
  await admin(`drop database if exists "${NAME}" with (force)`);
  await admin(`create database "${NAME}"`);
  // The migrations up to 0006 only: the database as it stood before readings were partitioned.
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "wormward-migrations-"));
  fs.cpSync(migrationsFolder, tmp, { recursive: true });
  const journalPath = path.join(tmp, "meta", "_journal.json");
  const journal = JSON.parse(fs.readFileSync(journalPath, "utf8")) as { entries: { tag: string }[] };
  const cut = journal.entries.findIndex((e) => e.tag.startsWith("0007_"));
  expect(cut).toBeGreaterThan(0);
  journal.entries = journal.entries.slice(0, cut);
  fs.writeFileSync(journalPath, JSON.stringify(journal));
  pool = new pg.Pool({ connectionString: url, max: 2 });
  await migrate(drizzle(pool), { migrationsFolder: tmp });
  const kind = await pool.query(`select relkind from pg_class where oid = 'public.readings'::regclass`);
  expect(kind.rows[0].relkind).toBe("r");
  await pool.query(
    `insert into readings (probe_id, metric, ts, value)
     select p, 'temperature', t, 20 + p + extract(epoch from t) / 1e9 from generate_series($1::timestamptz, $2::timestamptz, interval '10 minutes') t, generate_series(1, 2) p`,
    [from.toISOString(), now.toISOString()],
  );
  for (const m of [monthStart(now, -1), monthStart(now)]) {
    await pool.query(`insert into readings values (1, 'moisture', $1, 61), (1, 'moisture', $2, 62)`, [
      new Date(m.getTime() - 1).toISOString(),
      m.toISOString(),
    ]);
  }
  await pool.query(`insert into readings values (2, 'moisture', '2001-03-04T05:06:07Z', 40)`);
  await pool.query(`
    insert into reading_rollups (probe_id, metric, hour, min, max, sum, count)
    select probe_id, metric, date_trunc('hour', ts, 'UTC'), min(value), max(value), sum(value), count(*) from readings group by 1, 2, 3`);
  const b = await pool.query(`select count(*)::int as n, sum(value) as total from readings`);
  before = { n: b.rows[0].n, total: b.rows[0].total };
  // Now the whole chain, as npm start would run it on this database.
  await runMigrations(url);
}, 180_000);

afterAll(async () => {
  await pool?.end();
  await admin(`drop database if exists "${NAME}" with (force)`);
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
});

describe("moving readings into monthly partitions", () => {
  it("keeps every reading, now in a partitioned table", async () => {
    const kind = await pool.query(`select relkind from pg_class where oid = 'public.readings'::regclass`);
    expect(kind.rows[0].relkind).toBe("p");
    const a = await pool.query(`select count(*)::int as n, sum(value) as total from readings`);
    expect(a.rows[0].n).toBe(before.n);
    expect(a.rows[0].total).toBeCloseTo(before.total, 6);
    const gone = await pool.query(`select to_regclass('public.readings_unpartitioned') as t`);
    expect(gone.rows[0].t).toBeNull();
  });

  it("puts each reading in the month partition whose bounds hold it; the 2001 one in the default", async () => {
    const d = drizzle(pool, { schema });
    const parts = await listReadingPartitions(d);
    const byName = new Map(parts.map((p) => [p.name, p]));
    const rows = await pool.query<{ part: string; lo: Date; hi: Date; n: number }>(
      `select tableoid::regclass::text as part, min(ts) as lo, max(ts) as hi, count(*)::int as n from readings group by 1`,
    );
    expect(rows.rows.length).toBeGreaterThanOrEqual(4);
    for (const r of rows.rows) {
      const p = byName.get(r.part)!;
      expect(p, r.part).toBeDefined();
      if (p.from == null) {
        expect(r.lo.toISOString()).toBe("2001-03-04T05:06:07.000Z");
        expect(r.n).toBe(1);
        continue;
      }
      expect(r.lo.getTime()).toBeGreaterThanOrEqual(p.from.getTime());
      expect(r.hi.getTime()).toBeLessThan(p.to!.getTime());
      // Monthly, cut at UTC midnight on the first.
      expect(p.from.toISOString()).toBe(monthStart(p.from).toISOString());
    }
    // A month's first instant and the millisecond before it sit in two partitions.
    const edge = monthStart(now);
    const e = await pool.query(
      `select ts, tableoid::regclass::text as part from readings where metric = 'moisture' and probe_id = 1 and ts in ($1, $2) order by ts`,
      [new Date(edge.getTime() - 1).toISOString(), edge.toISOString()],
    );
    expect(e.rows).toHaveLength(2);
    expect(e.rows[0].part).not.toBe(e.rows[1].part);
    // Months from 5 years back to 4 ahead (pg_partman's premake).
    const months = parts.filter((p) => p.from);
    expect(months.at(-1)!.from!.toISOString()).toBe(monthStart(now, 4).toISOString());
    expect(months[0]!.from!.getTime()).toBeLessThanOrEqual(monthStart(now, -59).getTime());
  });

  it("still ignores a resent reading by its key", async () => {
    const m = monthStart(now);
    const r = await pool.query(`insert into readings values (1, 'moisture', $1, 99) on conflict do nothing`, [m.toISOString()]);
    expect(r.rowCount).toBe(0);
    const v = await pool.query(`select value from readings where probe_id = 1 and metric = 'moisture' and ts = $1`, [m.toISOString()]);
    expect(v.rows).toEqual([{ value: 62 }]);
  });

  it("maintenance makes months ahead again; a retention drops old months of raw readings and keeps the rollups", async () => {
    const d = drizzle(pool, { schema });
    const last = (await listReadingPartitions(d)).filter((p) => p.from).at(-1)!;
    await pool.query(`drop table "${last.name}"`);
    expect((await listReadingPartitions(d)).some((p) => p.name === last.name)).toBe(false);
    await runPartitionMaintenance(null, d);
    expect((await listReadingPartitions(d)).some((p) => p.name === last.name)).toBe(true);

    const rollups = (await pool.query(`select count(*)::int as n from reading_rollups`)).rows[0].n as number;
    await runPartitionMaintenance(1, d);
    const kept = await listReadingPartitions(d);
    const cutoff = monthStart(now, -1);
    for (const p of kept) if (p.to) expect(p.to.getTime()).toBeGreaterThan(cutoff.getTime() - 31 * DAY);
    const old = await pool.query(`select count(*)::int as n from readings where ts >= $1 and ts < $2`, [from.toISOString(), monthStart(now, -1).toISOString()]);
    expect(old.rows[0].n).toBe(0);
    const recent = await pool.query(`select count(*)::int as n from readings where ts >= $1`, [monthStart(now).toISOString()]);
    expect(recent.rows[0].n).toBeGreaterThan(0);
    expect((await pool.query(`select count(*)::int as n from reading_rollups`)).rows[0].n).toBe(rollups);
    // The default partition (readings older than the months made) is never dropped by retention.
    expect((await pool.query(`select count(*)::int as n from readings where ts < '2002-01-01'`)).rows[0].n).toBe(1);
    // Unset again: keep every month.
    await runPartitionMaintenance(null, d);
    const cfg = await pool.query(`select retention from partman.part_config where parent_table = 'public.readings'`);
    expect(cfg.rows[0].retention).toBeNull();
  });
});
