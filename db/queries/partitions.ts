import { sql } from "drizzle-orm";
import { db } from "@/db";
import type { Executor } from "@/db/queries/readings";

// readings is partitioned by month with pg_partman (db/migrations/0007_readings-by-month.sql).

/**
 * pg_partman's maintenance for readings: makes the months ahead (premake 4) and, with a retention,
 * drops whole months of raw readings older than it (the hourly and daily rollups are other tables
 * and stay). `retentionMonths` null keeps every month. Runs in UTC, as the migration that cut the
 * first months did (pg_partman cuts months in the session's time zone).
 */
export async function runPartitionMaintenance(retentionMonths: number | null, ex: Executor = db()): Promise<void> {
  await ex.transaction(async (tx) => {
    await tx.execute(sql`set local TimeZone = 'UTC'`);
    await tx.execute(sql`
      update partman.part_config set retention = ${retentionMonths == null ? null : `${retentionMonths} months`}
      where parent_table = 'public.readings' and retention is distinct from ${retentionMonths == null ? null : `${retentionMonths} months`}`);
    await tx.execute(sql`select partman.run_maintenance(p_parent_table := 'public.readings', p_analyze := false, p_jobmon := false)`);
  });
}

export type ReadingPartition = { name: string; from: Date | null; to: Date | null };

/** The partitions of readings, oldest first, with their bounds (the default partition: null, null). */
export async function listReadingPartitions(ex: Executor = db()): Promise<ReadingPartition[]> {
  const r = await ex.execute<{ name: string; bound: string }>(sql`
    select c.relname as name, pg_get_expr(c.relpartbound, c.oid) as bound
    from pg_inherits i join pg_class c on c.oid = i.inhrelid
    where i.inhparent = 'public.readings'::regclass`);
  // Bounds print as '2026-01-01 00:00:00+00' (in the session's zone): made ISO for Date.
  const at = (s: string | undefined) => (s ? new Date(s.replace(" ", "T").replace(/([+-]\d\d)$/, "$1:00")) : null);
  return r.rows
    .map((x) => {
      const m = /FROM \('([^']+)'\) TO \('([^']+)'\)/.exec(x.bound);
      return { name: x.name, from: at(m?.[1]), to: at(m?.[2]) };
    })
    .sort((a, b) => (a.from?.getTime() ?? Infinity) - (b.from?.getTime() ?? Infinity));
}
