import { and, eq, inArray, isNull, or, lt, sql } from "drizzle-orm";
import { db } from "@/db";
import { bins, farms, zones } from "@/db/schema";
import { lastFeedingsOfFarm } from "./bins";

export async function listFarmsForDigest(farmIds?: string[]) {
  return db()
    .select({ id: farms.id, name: farms.name, timezone: farms.timezone, unitSystem: farms.unitSystem, digestSentOn: farms.digestSentOn })
    .from(farms)
    .where(farmIds ? inArray(farms.id, farmIds) : undefined);
}

// Compare-and-set: true for exactly one caller per farm and day, however many ingest nodes ask.
export async function claimDigestDay(farmId: string, day: string) {
  const rows = await db()
    .update(farms)
    .set({ digestSentOn: day })
    .where(and(eq(farms.id, farmId), or(isNull(farms.digestSentOn), lt(farms.digestSentOn, day))))
    .returning({ id: farms.id });
  return rows.length > 0;
}

// Gives the day back when no mail at all went out, so the next tick tries again.
export async function releaseDigestDay(farmId: string, day: string, previous: string | null) {
  await db()
    .update(farms)
    .set({ digestSentOn: previous })
    .where(and(eq(farms.id, farmId), eq(farms.digestSentOn, day)));
}

export type DigestZoneRange = { zoneId: string; metric: "temperature" | "moisture"; min: number; max: number };
export type DigestAlertCount = { binId: string; kind: string; level: string; raised: number; settled: number };
export type DigestFeedings = { binId: string; count: number; totalKg: number | null };

// One farm's day, [from, to): bins and zones, per-zone ranges from the hourly rollups, alerts raised
// and settled, feedings logged; and for the next feeding, each bin's interval, the farm's and the
// last feeding of each bin, whenever it was.
export async function getDigestData(farmId: string, from: Date, to: Date) {
  const d = db();
  const [binRows, zoneRows, ranges, alertRows, feedingRows, lastFed, [farm]] = await Promise.all([
    d
      .select({ id: bins.id, name: bins.name, feedingIntervalDays: bins.feedingIntervalDays })
      .from(bins)
      .where(and(eq(bins.farmId, farmId), isNull(bins.archivedAt)))
      .orderBy(bins.name),
    d
      .select({ id: zones.id, binId: zones.binId, kind: zones.kind, name: zones.name, position: zones.position })
      .from(zones)
      .innerJoin(bins, eq(bins.id, zones.binId))
      .where(and(eq(bins.farmId, farmId), isNull(zones.archivedAt)))
      .orderBy(zones.position),
    // Rollup hours are whole UTC hours; in a zone with a half-hour offset the edge hours straddle the day.
    d.execute(sql`
      select p.zone_id as "zoneId", r.metric::text as metric, min(r.min)::float8 as min, max(r.max)::float8 as max
      from reading_rollups r join probes p on p.id = r.probe_id
      where p.farm_id = ${farmId} and p.zone_id is not null
        and r.metric in ('temperature', 'moisture')
        and r.hour >= ${from.toISOString()} and r.hour < ${to.toISOString()}
      group by 1, 2`),
    d.execute(sql`
      select bin_id as "binId", kind::text as kind, level::text as level,
             count(*) filter (where raised_at >= ${from.toISOString()} and raised_at < ${to.toISOString()})::int as raised,
             count(*) filter (where settled_at >= ${from.toISOString()} and settled_at < ${to.toISOString()})::int as settled
      from alerts
      where farm_id = ${farmId}
        and ((raised_at >= ${from.toISOString()} and raised_at < ${to.toISOString()})
          or (settled_at >= ${from.toISOString()} and settled_at < ${to.toISOString()}))
      group by 1, 2, 3`),
    d.execute(sql`
      select bin_id as "binId", count(*)::int as count, sum(total_kg)::float8 as "totalKg"
      from feedings
      where farm_id = ${farmId} and at >= ${from.toISOString()} and at < ${to.toISOString()}
      group by 1`),
    lastFeedingsOfFarm(farmId),
    d.select({ feedingIntervalDays: farms.feedingIntervalDays }).from(farms).where(eq(farms.id, farmId)),
  ]);
  return {
    bins: binRows,
    zones: zoneRows,
    ranges: ranges.rows as DigestZoneRange[],
    alerts: alertRows.rows as DigestAlertCount[],
    feedings: feedingRows.rows as DigestFeedings[],
    lastFeedings: [...lastFed].map(([binId, at]) => ({ binId, at })),
    farmFeedingIntervalDays: farm?.feedingIntervalDays ?? null,
  };
}

export type DigestData = Awaited<ReturnType<typeof getDigestData>>;
