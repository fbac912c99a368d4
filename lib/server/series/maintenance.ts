import createDebug from "debug";
import { listFarmTimezones, refreshDailyRollups, type DailyRefresh } from "@/db/queries/daily-rollups";
import { runPartitionMaintenance } from "@/db/queries/partitions";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";

const log = createDebug("wormward:series-maintenance");

/**
 * How many months of raw readings to keep: `READINGS_RETENTION_MONTHS` (a whole number of months,
 * at least 1), unset or empty = keep every month. Older months are dropped whole by pg_partman;
 * the hourly and daily rollups that charts read beyond 3 days are kept.
 */
export function readingsRetentionMonths(value = process.env.READINGS_RETENTION_MONTHS): number | null {
  if (value == null || value.trim() === "") return null;
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1 || n > 1200) {
    throw new Error(`READINGS_RETENTION_MONTHS must be a whole number of months from 1 to 1200, or unset to keep every reading (got "${value}")`);
  }
  return n;
}

/** One round: the daily rollups up to last midnight, then pg_partman's months ahead and retention. */
export async function runSeriesMaintenance(opts: { retentionMonths: number | null; now?: Date }): Promise<DailyRefresh> {
  const stored = await listFarmTimezones();
  const done = await refreshDailyRollups({ stored, effective: stored.map(timeZoneOrUtc) }, opts.now);
  await runPartitionMaintenance(opts.retentionMonths);
  return done;
}

export type SeriesMaintenance = { tick: () => Promise<DailyRefresh>; stop: () => Promise<void> };

/**
 * The deferred step behind long charts and the readings' months, run by the ingest service: once
 * at start and then every `everyMs` (default an hour; pg_partman's own background worker runs
 * hourly by default too). Two nodes may both run it: the refresh takes an advisory lock and
 * pg_partman's maintenance takes its own.
 */
export function createSeriesMaintenance(opts: { everyMs?: number; retentionMonths?: number | null } = {}): SeriesMaintenance {
  const retentionMonths = opts.retentionMonths === undefined ? readingsRetentionMonths() : opts.retentionMonths;
  let running: Promise<unknown> = Promise.resolve();
  const tick = () => {
    const run = running.then(() => runSeriesMaintenance({ retentionMonths }));
    running = run.then(
      (d) => log("daily rollups: %d probes started again, %d days written", d.probesReset, d.daysWritten),
      (e: Error) => console.error("series maintenance failed:", e.message),
    );
    return run;
  };
  void tick().catch(() => {});
  const timer = setInterval(() => void tick().catch(() => {}), opts.everyMs ?? 3_600_000);
  timer.unref();
  return {
    tick,
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}
