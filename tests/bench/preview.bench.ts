// The rule preview's cost, printed, never asserted: `npx tsx tests/bench/preview.bench.ts`.
// Starts a throwaway PostgreSQL cluster ("pg-bench-preview", port WORMWARD_BENCH_PG_PORT or 54359),
// stores a bin of 3 zones, one probe each, reporting temperature and moisture every minute for 30
// days and a day before (the rules' lookback), with a daily swing and a few hot spells, and a feeding
// every third day; then times previewBinRule (the route's use case: the reads and two replays per
// zone), and the replays alone at several steps, so the step in lib/server/rules/preview.ts is chosen
// on figures.
import os from "node:os";
import pg from "pg";
import { startCluster, stopCluster } from "@/db/local-pg";
import { runMigrations } from "@/db/migrate";

const CLUSTER = "pg-bench-preview";
const ZONES = 3;
const DAYS = 31;
const MINUTE = 60_000;
const DAY = 86_400_000;
const RUNS = 3;

const fmt = (n: number, digits = 0) => n.toLocaleString("en-US", { maximumFractionDigits: digits, minimumFractionDigits: digits });

/** Temperature with a daily swing and a hot spell every fifth day in zone 0; moisture drifting. */
function valueAt(zone: number, t: number, metric: "temperature" | "moisture"): number {
  const day = (t % DAY) / DAY;
  if (metric === "moisture") return 78 + 3 * Math.sin((t / DAY) * 0.7 + zone) + 0.2 * Math.sin(t / 600_000);
  const dayIndex = Math.floor(t / DAY);
  const spell = zone === 0 && dayIndex % 5 === 0 && day > 0.4 && day < 0.6 ? 6 * Math.sin(((day - 0.4) / 0.2) * Math.PI) : 0;
  return 21 + 2 * Math.sin(day * 2 * Math.PI) + spell + 0.1 * Math.sin(t / 420_000);
}

async function main() {
  const cluster = await startCluster({ name: CLUSTER, port: Number(process.env.WORMWARD_BENCH_PG_PORT ?? 54359) });
  const admin = new pg.Client({ connectionString: cluster.adminUrl });
  await admin.connect();
  await admin.query("drop database if exists preview_bench with (force)");
  await admin.query("create database preview_bench");
  await admin.end();
  const url = cluster.adminUrl.replace(/\/postgres$/, "/preview_bench");
  await runMigrations(url);
  process.env.DATABASE_URL = url;
  // Imported after DATABASE_URL is set: the app's one pool reads it on first use.
  const { previewBinRule } = await import("@/lib/server/rules/preview");
  const { replay } = await import("@/lib/domain/rules");
  const { zoneReplayInput, seriesByProbe } = await import("@/lib/server/rules/replay-input");
  const { previewTimes, lookbackSizing } = await import("@/lib/server/rules/preview");
  const { resolveRules } = await import("@/lib/domain/rules");
  const { speciesProfiles } = await import("@/lib/domain/species");

  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    const farmId = (await c.query(`insert into farms (name) values ('Bench farm') returning id`)).rows[0].id as string;
    const binId = (await c.query(`insert into bins (farm_id, name, style, species) values ($1, 'Bench bin', 'bed', 'eisenia-fetida') returning id`, [farmId]))
      .rows[0].id as string;
    const now = Math.floor(Date.now() / MINUTE) * MINUTE;
    const start = now - DAYS * DAY;
    const probeIds: number[] = [];
    for (let z = 0; z < ZONES; z++) {
      const kind = ["fresh", "working", "curing"][z]!;
      const zoneId = (await c.query(`insert into zones (bin_id, position, kind) values ($1, $2, $3) returning id`, [binId, z + 1, kind])).rows[0].id as string;
      const probeId = (
        await c.query(
          `insert into probes (farm_id, zone_id, code, token_hash, metrics, report_interval_s, last_seen_at) values ($1, $2, $3, 'x', '{temperature,moisture}', 60, $4) returning id`,
          [farmId, zoneId, `bench-preview-${z}`, new Date(now)],
        )
      ).rows[0].id as number;
      probeIds.push(probeId);
      // A day at a time through unnest: 2 × 1,440 rows a statement.
      for (let d = 0; d < DAYS; d++) {
        const ts: string[] = [];
        const metrics: string[] = [];
        const values: number[] = [];
        for (let m = 0; m < 1440; m++) {
          const t = start + d * DAY + m * MINUTE;
          for (const metric of ["temperature", "moisture"] as const) {
            ts.push(new Date(t).toISOString());
            metrics.push(metric);
            values.push(valueAt(z, t, metric));
          }
        }
        await c.query(
          `insert into readings (probe_id, metric, ts, value) select $1, m::metric, t::timestamptz, v from unnest($2::text[], $3::text[], $4::float8[]) as x(t, m, v)`,
          [probeId, ts, metrics, values],
        );
      }
    }
    for (let d = 1; d < DAYS; d += 3) {
      await c.query(`insert into feedings (farm_id, bin_id, at, total_kg, mix_moisture_pct, mix_cn) values ($1, $2, $3, 4, 80, 22)`, [
        farmId,
        binId,
        new Date(start + d * DAY + 9 * 3_600_000),
      ]);
    }
    await c.query("analyze readings");
    const rows = (await c.query(`select count(*)::int as n from readings`)).rows[0].n as number;
    console.log(
      `Wormward rule-preview bench: ${ZONES} zones × ${DAYS} days of 1-min temperature and moisture (${fmt(rows)} readings), ${os.cpus().length} CPU(s), Node ${process.version}`,
    );

    const who = { farmId };
    const change = (headsUpAboveC: number) => ({ kind: "heat" as const, enabled: true, thresholds: { headsUpAboveC } });
    const STEP = 10 * MINUTE;
    await previewBinRule(who, binId, change(23), new Date(now - 10 * STEP)); // warm-up: JIT, pool
    // Cold: each run's window ends on another step, so nothing is remembered from the run before.
    const cold: number[] = [];
    let last = null as Awaited<ReturnType<typeof previewBinRule>> | null;
    for (let i = 0; i < RUNS; i++) {
      const t0 = performance.now();
      last = await previewBinRule(who, binId, change(23), new Date(now - i * STEP));
      cold.push(performance.now() - t0);
    }
    // Warm: the owner types another number within the same step; the month of readings and the saved
    // rules' replay are remembered (lib/server/rules/preview-memo.ts), the change is replayed.
    const warm: number[] = [];
    for (let i = 0; i < RUNS; i++) {
      const t0 = performance.now();
      await previewBinRule(who, binId, change(22 + i * 0.25), new Date(now));
      warm.push(performance.now() - t0);
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    console.log(
      `\npreviewBinRule (heat; reads + replays of ${ZONES} zones at a ${last!.stepMinutes}-min step):` +
        `\n  first preview in a step (reads, saved rules' and changed rules' replays): median ${fmt(median(cold))} ms of ${RUNS}` +
        `\n  next edit in the same step (the changed rules' replays): median ${fmt(median(warm))} ms of ${RUNS}` +
        `\n  heads-up 23 °C: now ${last!.now.heads_up} heads-up, ${last!.now.act_now} act now → with the change ${last!.proposed.heads_up} heads-up, ${last!.proposed.act_now} act now`,
    );

    // The replay alone, one zone, at several steps (readings already in memory).
    const { listPreviewHistory } = await import("@/db/queries/preview-inputs");
    const t0 = performance.now();
    const r = await listPreviewHistory(binId, probeIds, new Date(start), new Date(now));
    console.log(`\nlistPreviewHistory (all ${fmt(rows)} readings of the bin): ${fmt(performance.now() - t0)} ms`);
    r.readings = r.readings.filter((x) => x.probeId === probeIds[0]);
    const series = seriesByProbe(r.readings);
    const zoneId = (await c.query(`select zone_id from probes where id = $1`, [probeIds[0]])).rows[0].zone_id as string;
    const h = {
      binName: "Bench bin",
      species: speciesProfiles["eisenia-fetida"],
      unitSystem: "metric" as const,
      timeZone: "UTC",
      bed: { lengthCm: null, widthCm: null, zoneCount: 3 },
      probes: [
        {
          id: probeIds[0]!,
          zoneId,
          code: "bench-preview-0",
          label: null,
          reportIntervalS: 60,
          lastSeenAt: new Date(now),
          metrics: ["temperature", "moisture"],
        },
      ],
      readings: r.readings,
      feedings: [],
      refusals: [],
    };
    const input = zoneReplayInput({ id: zoneId, kind: "fresh", name: null }, h, series, {}, ["heat"]);
    const sized = { ...input, overrides: lookbackSizing("heat", {}), rules: resolveRules(input.species, {}) };
    const said = (out: ReturnType<typeof replay>) => JSON.stringify(out.flatMap((s) => s.transitions.map((t) => [s.at, t.type, t.level])));
    console.log(`\nreplay() of one zone's heat rule over 30 days (${fmt(r.readings.reduce((n, x) => n + x.t.length, 0))} readings in memory):`);
    for (const stepMin of [1, 5, 10, 15]) {
      const steps = previewTimes(now - 30 * DAY, now, stepMin * MINUTE);
      const line = (label: string, run: () => ReturnType<typeof replay>) => {
        const t0 = performance.now();
        const out = run();
        const ms = performance.now() - t0;
        const raises = out.flatMap((s) => s.transitions).filter((t) => t.type === "raise").length;
        console.log(
          `  every ${String(stepMin).padStart(2)} min, ${label}: ${fmt(steps.length)} steps in ${fmt(ms)} ms (${fmt((ms * 1000) / steps.length)} µs a step), ${raises} raised`,
        );
        return out;
      };
      const full = stepMin === 1 ? null : line("full lookback  ", () => replay(input, steps));
      const trimmed = line("heat's lookback", () => replay(sized, steps));
      if (full) console.log(`    same transitions at the same steps: ${said(full) === said(trimmed) ? "yes" : "NO"}`);
    }
  } finally {
    await c.end();
    const { closeDb } = await import("@/db");
    await closeDb();
    stopCluster(CLUSTER);
  }
}

await main();
