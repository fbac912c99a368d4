// The demo farm's half year of invented history (db/demo-history.ts), seeded into a fresh database
// from the migrated template: the same end time and seed give the same rows, the logbook follows
// the farm's habits, the readings answer the events, the rollups match the raw readings, and the
// two alerts sit where their readings say.
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { buildDemoHistory, countReadings, STEP_MS, type DemoHistory } from "@/db/demo-history";
import * as schema from "@/db/schema";
import { DEMO_HISTORY_DAYS, loadHistoryInput, seedDemo, type SeedCounts } from "@/db/seed";
import { checkMix } from "@/lib/domain/mix";
import { speciesProfiles } from "@/lib/domain/species";
import { TEMPLATE } from "../../setup/global";

const DAY = 86_400_000;
const HOUR = 3_600_000;
const adminUrl = inject("adminUrl");
const name = `wormward_history_${process.pid}`;
let pool: pg.Pool;
let farmId: string;
let counts: SeedCounts;
let endMs: number;
let rebuilt: DemoHistory;
let seededAt: { before: number; after: number };

async function admin(sql: string) {
  const c = new pg.Client({ connectionString: adminUrl });
  await c.connect();
  try {
    await c.query(sql);
  } finally {
    await c.end();
  }
}
const q = async <T = Record<string, unknown>>(sql: string, params: unknown[] = []) => (await pool.query(sql, params)).rows as T[];
const valueAt = async (code: string, metric: string, t: number) =>
  (
    await q<{ value: number }>(`select r.value from readings r join probes p on p.id = r.probe_id where p.code = $1 and r.metric = $2 and r.ts = $3`, [
      code,
      metric,
      new Date(t),
    ])
  )[0]?.value ?? null;

beforeAll(async () => {
  expect(new URL(adminUrl).hostname).toBe("127.0.0.1");
  await admin(`drop database if exists "${name}" with (force)`);
  await admin(`create database "${name}" template ${TEMPLATE}`);
  pool = new pg.Pool({ connectionString: adminUrl.replace(/\/postgres$/, `/${name}`), max: 3 });
  const d = drizzle(pool, { schema });
  seededAt = { before: Date.now(), after: 0 };
  counts = (await seedDemo(d)).counts;
  seededAt.after = Date.now();
  farmId = (await q<{ id: string }>(`select id from farms where name = 'Alder Row Worm Farm'`))[0]!.id;
  endMs = (await q<{ t: Date }>(`select max(ts) as t from readings where metric = 'temperature'`))[0]!.t.getTime();
  rebuilt = buildDemoHistory(await loadHistoryInput(d, farmId, endMs));
});

afterAll(async () => {
  await pool?.end();
  await admin(`drop database if exists "${name}" with (force)`);
});

describe("the demo farm's history", () => {
  it("ends at the seed's moment rounded down to 5 minutes and reaches back 180 days", async () => {
    expect(endMs % STEP_MS).toBe(0);
    expect(endMs).toBeGreaterThan(seededAt.before - STEP_MS);
    expect(endMs).toBeLessThanOrEqual(seededAt.after);
    const first = (await q<{ t: Date }>(`select min(ts) as t from readings where metric = 'temperature'`))[0]!.t.getTime();
    expect(first).toBe(endMs - DEMO_HISTORY_DAYS * DAY);
  });

  it("the same end time and seed give the same rows, and the counts the seed reported are the stored ones", async () => {
    // Per probe and metric: how many readings, their sum, first and last, stored vs rebuilt.
    const stored = await q<{ probe_id: number; metric: string; n: number; s: number; lo: Date; hi: Date }>(
      `select probe_id, metric::text, count(*)::int as n, sum(value) as s, min(ts) as lo, max(ts) as hi from readings group by 1, 2 order by 1, 2`,
    );
    const built = rebuilt.series
      .map((s) => {
        const at = [...s.values.keys()].filter((i) => !Number.isNaN(s.values[i]!));
        return {
          probe_id: s.probeId,
          metric: s.metric,
          n: at.length,
          s: at.reduce((x, i) => x + s.values[i]!, 0),
          lo: s.startMs + at[0]! * s.stepMs,
          hi: s.startMs + at[at.length - 1]! * s.stepMs,
        };
      })
      .sort((a, b) => a.probe_id - b.probe_id || a.metric.localeCompare(b.metric));
    expect(stored.map((r) => [r.probe_id, r.metric, r.n, r.lo.getTime(), r.hi.getTime()])).toEqual(
      built.map((r) => [r.probe_id, r.metric, r.n, r.lo, r.hi]).sort((a, b) => (a[0] as number) - (b[0] as number) || String(a[1]).localeCompare(String(b[1]))),
    );
    for (const r of stored) {
      const b = built.find((x) => x.probe_id === r.probe_id && x.metric === r.metric)!;
      expect(Math.abs(r.s - b.s)).toBeLessThan(1e-6 * Math.abs(b.s) + 1e-9);
    }
    const feedings = await q<{ at: Date; total_kg: number; mix_cn: number }>(`select at, total_kg, mix_cn from feedings order by at, total_kg`);
    expect(feedings.map((f) => [f.at.getTime(), f.total_kg, f.mix_cn])).toEqual(
      [...rebuilt.feedings].sort((a, b) => a.at.getTime() - b.at.getTime() || a.totalKg - b.totalKg).map((f) => [f.at.getTime(), f.totalKg, f.mixCn]),
    );
    const n = async (table: string) => (await q<{ n: number }>(`select count(*)::int as n from ${table}`))[0]!.n;
    expect(counts.readings).toBe(countReadings(rebuilt.series));
    expect(await n("readings")).toBe(counts.readings);
    expect(await n("reading_rollups")).toBe(counts.rollups);
    expect({ f: await n("feedings"), w: await n("waterings"), s: await n("shifts"), h: await n("harvests"), a: await n("alerts") }).toEqual({
      f: rebuilt.feedings.length,
      w: rebuilt.waterings.length,
      s: rebuilt.shifts.length,
      h: rebuilt.harvests.length,
      a: rebuilt.alerts.length,
    });
    expect(counts).toMatchObject({ feedings: rebuilt.feedings.length, waterings: rebuilt.waterings.length, alerts: 2 });
    // Another seed is another half year.
    const other = buildDemoHistory({ ...(await loadHistoryInput(drizzle(pool, { schema }), farmId, endMs, { seed: 99 })) });
    expect(other.series[0]!.values).not.toEqual(rebuilt.series[0]!.values);
  });

  it("every bin is fed every 3 to 4 weeks with a mix whose check values are the mix check's", async () => {
    const bins = await q<{ id: string; name: string }>(`select id, name from bins where farm_id = $1`, [farmId]);
    expect(bins).toHaveLength(4);
    for (const bin of bins) {
      const rows = await q<{ id: string; at: Date; mix_moisture_pct: number; mix_cn: number; zone_kind: string }>(
        `select f.id, f.at, f.mix_moisture_pct, f.mix_cn, z.kind as zone_kind from feedings f join zones z on z.id = f.zone_id where f.bin_id = $1 order by f.at`,
        [bin.id],
      );
      const times = rows.map((r) => r.at.getTime());
      expect(times[0]! - (endMs - DEMO_HISTORY_DAYS * DAY), bin.name).toBeLessThan(29 * DAY);
      expect(endMs - times[times.length - 1]!, bin.name).toBeLessThan(32 * DAY);
      for (let i = 1; i < times.length; i++) {
        expect(times[i]! - times[i - 1]!, bin.name).toBeGreaterThanOrEqual(20 * DAY);
        expect(times[i]! - times[i - 1]!, bin.name).toBeLessThanOrEqual(29 * DAY);
      }
      for (const f of rows) {
        const items = await q<{ mass_kg: number; moisture_pct: number; carbon_pct: number; nitrogen_pct: number; ingredient_id: string | null }>(
          `select mass_kg, moisture_pct, carbon_pct, nitrogen_pct, ingredient_id from feeding_items where feeding_id = $1`,
          [f.id],
        );
        expect(items.length).toBeGreaterThanOrEqual(2);
        expect(items.every((i) => i.ingredient_id !== null)).toBe(true);
        const check = checkMix(items.map((i) => ({ massKg: i.mass_kg, moisturePct: i.moisture_pct, carbonPct: i.carbon_pct, nitrogenPct: i.nitrogen_pct })));
        expect(check.ok).toBe(true);
        if (!check.ok) continue;
        expect(f.mix_moisture_pct).toBeCloseTo(check.value.moisturePct, 1);
        expect(f.mix_cn).toBeCloseTo(check.value.cn!, 1);
      }
      // The fed zone is the feeding side (a tote's only zone).
      expect(new Set(rows.map((r) => r.zone_kind)), bin.name).toEqual(new Set([bin.name === "Shed Tote" ? "working" : "fresh"]));
    }
  });

  it("harvests come every 1 to 2 months from the harvest side; shifts move toward it in the flow-through and windrow bins only", async () => {
    const rows = await q<{ bin: string; style: string; at: Date; mass_kg: number; volume_l: number; position: number; last: number }>(
      `select b.name as bin, b.style::text, h.at, h.mass_kg, h.volume_l, z.position,
              (select max(position) from zones where bin_id = b.id)::int as last
         from harvests h join bins b on b.id = h.bin_id join zones z on z.id = h.zone_id order by b.name, h.at`,
    );
    for (const bin of new Set(rows.map((r) => r.bin))) {
      const hs = rows.filter((r) => r.bin === bin);
      expect(hs.length, bin).toBeGreaterThanOrEqual(3);
      for (const h of hs) {
        expect(h.position).toBe(h.last);
        expect(h.mass_kg).toBeGreaterThan(0);
        expect(h.volume_l).toBeGreaterThan(h.mass_kg);
      }
      for (let i = 1; i < hs.length; i++) {
        const gap = hs[i]!.at.getTime() - hs[i - 1]!.at.getTime();
        expect(gap).toBeGreaterThanOrEqual(30 * DAY);
        expect(gap).toBeLessThanOrEqual(62 * DAY);
      }
    }
    expect(new Set(rows.map((r) => r.bin)).size).toBe(4);
    const shifts = await q<{ style: string; from_pos: number; to_pos: number; volume_l: number }>(
      `select b.style::text, zf.position as from_pos, zt.position as to_pos, s.volume_l
         from shifts s join bins b on b.id = s.bin_id join zones zf on zf.id = s.zone_id join zones zt on zt.id = s.to_zone_id`,
    );
    expect(shifts.length).toBeGreaterThan(0);
    for (const s of shifts) {
      expect(["flow-through", "windrow"]).toContain(s.style);
      expect(s.to_pos).toBe(s.from_pos + 1);
      expect(s.volume_l).toBeGreaterThan(0);
    }
  });

  it("moisture jumps after each watering, and a fed zone warms in the day after a feeding", async () => {
    const waterings = await q<{ bin_id: string; at: Date }>(`select bin_id, at from waterings order by at`);
    expect(waterings.length).toBeGreaterThan(10);
    for (const w of waterings) {
      const t = w.at.getTime();
      const [m] = await q<{ before: number; after: number }>(
        `select avg(value) filter (where ts = $2) as before, avg(value) filter (where ts = $3) as after
           from readings r join probes p on p.id = r.probe_id join zones z on z.id = p.zone_id
          where z.bin_id = $1 and r.metric = 'moisture' and r.ts in ($2, $3)`,
        [w.bin_id, new Date(t - STEP_MS), new Date(t + 3 * HOUR)],
      );
      expect(m!.after - m!.before).toBeGreaterThan(1);
    }
    // Against the same clock time the evening before, so the day's swing cancels out, and against the
    // bin's curing zone over the same day (alder-03, not fed), so the room's weather cancels out too.
    const fed = await q<{ code: string; at: Date; total_kg: number }>(
      `select p.code, f.at, f.total_kg from feedings f join probes p on p.zone_id = f.zone_id join bins b on b.id = f.bin_id where b.name = 'Long Bed North' and f.total_kg < 3 order by f.at`,
    );
    let warmer = 0;
    for (const f of fed) {
      const at = Math.round(f.at.getTime() / STEP_MS) * STEP_MS;
      const change = async (code: string) => {
        const after = await valueAt(code, "temperature", at + 18 * HOUR);
        const before = await valueAt(code, "temperature", at - 6 * HOUR);
        return after !== null && before !== null ? after - before : null;
      };
      const own = await change(f.code);
      const room = await change("alder-03");
      if (own !== null && room !== null) warmer += own - room;
    }
    expect(fed.length).toBeGreaterThanOrEqual(4);
    expect(warmer / fed.length).toBeGreaterThan(0.3);
  });

  it("an hour's rollup holds the count and sum of that hour's raw readings", async () => {
    for (const [code, metric, daysAgo] of [
      ["alder-02", "temperature", 100],
      ["alder-01", "ammonia", 30],
      ["alder-07", "moisture", 170],
    ] as const) {
      const hour = Math.floor((endMs - daysAgo * DAY) / HOUR) * HOUR;
      const [raw] = await q<{ n: number; s: number; lo: number; hi: number }>(
        `select count(*)::int as n, sum(value) as s, min(value) as lo, max(value) as hi from readings r join probes p on p.id = r.probe_id
          where p.code = $1 and r.metric = $2 and r.ts >= $3 and r.ts < $4`,
        [code, metric, new Date(hour), new Date(hour + HOUR)],
      );
      const [roll] = await q<{ count: number; sum: number; min: number; max: number }>(
        `select count, sum, min, max from reading_rollups r join probes p on p.id = r.probe_id where p.code = $1 and r.metric = $2 and r.hour = $3`,
        [code, metric, new Date(hour)],
      );
      expect(raw!.n).toBe(12);
      expect(roll).toMatchObject({ count: raw!.n, min: raw!.lo, max: raw!.hi });
      expect(roll!.sum).toBeCloseTo(raw!.s, 9);
    }
    const [all] = await q<{ raw: number; rolled: number }>(
      `select (select count(*) from readings)::int as raw, (select sum(count) from reading_rollups)::int as rolled`,
    );
    expect(all!.rolled).toBe(all!.raw);
  });

  it("the heat alert is raised while the fresh zone's readings climb after the heavy feed, claimed by the keeper and settled with a note once cooled", async () => {
    const [a] = await q<{ id: string; raised_at: Date; claimed_at: Date; settled_at: Date; claimed_by: string; level: string; zone_id: string; state: string }>(
      `select * from alerts where kind = 'heat'`,
    );
    expect(a).toBeDefined();
    expect(a!.state).toBe("settled");
    const [keeper] = await q<{ user_id: string }>(`select user_id from memberships where farm_id = $1 and role = 'keeper'`, [farmId]);
    expect(a!.claimed_by).toBe(keeper!.user_id);
    const events = await q<{ type: string; at: Date; user_id: string | null; detail: { note?: string } }>(
      `select * from alert_events where alert_id = $1 order by at, id`,
      [a!.id],
    );
    expect(events.map((e) => e.type).filter((t) => t !== "escalated")).toEqual(["raised", "claimed", "settled"]);
    expect(events[events.length - 1]!.detail.note).toMatch(/\w/);
    const [heavy] = await q<{ at: Date }>(`select at from feedings where zone_id = $1 order by total_kg desc limit 1`, [a!.zone_id]);
    const raised = a!.raised_at.getTime();
    expect(raised).toBeGreaterThan(heavy!.at.getTime());
    expect(raised - heavy!.at.getTime()).toBeLessThan(12 * HOUR);
    const [probe] = await q<{ code: string }>(`select code from probes where zone_id = $1`, [a!.zone_id]);
    // Rising at the raise: higher than an hour before, and higher again an hour later.
    const before = (await valueAt(probe!.code, "temperature", raised - HOUR))!;
    const at = (await valueAt(probe!.code, "temperature", raised))!;
    const later = (await valueAt(probe!.code, "temperature", raised + HOUR))!;
    expect(at).toBeGreaterThan(before + 0.5);
    expect(later).toBeGreaterThan(at + 0.5);
    const band = speciesProfiles["eisenia-fetida"].temperatureC;
    const [peak] = await q<{ hi: number }>(
      `select max(value) as hi from readings r join probes p on p.id = r.probe_id where p.code = $1 and metric = 'temperature' and ts between $2 and $3`,
      [probe!.code, a!.raised_at, a!.settled_at],
    );
    expect(peak!.hi).toBeGreaterThan(band.comfortHigh);
    expect((await valueAt(probe!.code, "temperature", Math.floor(a!.settled_at.getTime() / STEP_MS) * STEP_MS))!).toBeLessThan(band.comfortHigh);
    expect(a!.claimed_at.getTime()).toBeGreaterThan(raised);
    expect(a!.settled_at.getTime()).toBeGreaterThan(a!.claimed_at.getTime());
  });

  it("the silent probe's gap is the one its alert names: raised after its last reading, settled after it came back", async () => {
    const [a] = await q<{ probe_id: number; raised_at: Date; settled_at: Date; state: string }>(`select * from alerts where kind = 'silent_probe'`);
    expect(a?.state).toBe("settled");
    // Every gap longer than the 5-minute step, over all probes.
    const gaps = await q<{ probe_id: number; last: Date; back: Date }>(
      `select probe_id, prev as last, ts as back from (
         select probe_id, ts, lag(ts) over (partition by probe_id order by ts) as prev from readings where metric = 'temperature') g
       where ts - prev > interval '5 minutes'`,
    );
    expect(gaps).toHaveLength(1);
    const gap = gaps[0]!;
    expect(gap.probe_id).toBe(a!.probe_id);
    expect(gap.back.getTime() - gap.last.getTime()).toBeGreaterThan(3 * HOUR);
    expect(a!.raised_at.getTime()).toBeGreaterThan(gap.last.getTime());
    expect(a!.raised_at.getTime()).toBeLessThanOrEqual(gap.last.getTime() + 15 * 60_000);
    expect(a!.settled_at.getTime()).toBeGreaterThan(gap.back.getTime());
    expect(a!.settled_at.getTime()).toBeLessThan(gap.back.getTime() + 3 * HOUR);
  });
});
