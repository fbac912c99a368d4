import { and, asc, eq, gte, inArray, isNull, lte, sql } from "drizzle-orm";
import { db } from "@/db";
import { bins, farms, feedings, probes, rejectedMessages, rules, zones } from "@/db/schema";

// What the rule preview replays: one bin of one farm (its zones, live probes and rule rows), then
// that bin's history over a window: every reading of its probes, its feedings and the probes'
// refusals. The same rows the live runner reads per zone (db/queries/rule-inputs.ts), for a month.

/** The bin with its farm, zones, live probes and the farm's rule rows; null when the bin is not the farm's. */
export async function getPreviewBin(farmId: string, binId: string) {
  const d = db();
  const [row] = await d
    .select({ bin: bins, farm: farms })
    .from(bins)
    .innerJoin(farms, eq(farms.id, bins.farmId))
    .where(and(eq(bins.id, binId), eq(bins.farmId, farmId), isNull(bins.archivedAt)));
  if (!row) return null;
  const [zoneRows, ruleRows] = await Promise.all([
    d
      .select()
      .from(zones)
      .where(and(eq(zones.binId, binId), isNull(zones.archivedAt)))
      .orderBy(asc(zones.position)),
    d.select().from(rules).where(eq(rules.farmId, farmId)),
  ]);
  const zoneIds = zoneRows.map((z) => z.id);
  const probeRows = zoneIds.length
    ? await d
        .select()
        .from(probes)
        .where(and(inArray(probes.zoneId, zoneIds), isNull(probes.archivedAt)))
        .orderBy(asc(probes.id))
    : [];
  return { ...row, zones: zoneRows, probes: probeRows, rules: ruleRows };
}

/** One probe's series of one metric: times (epoch ms) and values, oldest first. */
export type PreviewSeriesRow = { probeId: number; metric: string; t: number[]; v: number[] };

/** Readings of these probes and their refusals from `from` to `to` (readings oldest first per probe
 * and metric), and the bin's feedings from `feedingsFrom`. */
export async function listPreviewHistory(binId: string, probeIds: number[], from: Date, to: Date, feedingsFrom: Date = from) {
  const d = db();
  const [readingRows, feedingRows, refusalRows] = await Promise.all([
    probeIds.length
      ? // Raw SQL: one row per probe and metric holding its times (epoch ms) and values as two
        // comma-separated texts, which PostgreSQL builds and we split in about half the time a month
        // of 1-min rows takes as row objects (tests/bench/preview.bench.ts). float8 prints in its
        // shortest exact form (PostgreSQL 12+), so every value comes back as stored. The key
        // (probe_id, metric, ts) serves the range.
        d.execute(sql`
          select probe_id as "probeId", metric::text as metric,
            string_agg((extract(epoch from ts) * 1000)::bigint::text, ',' order by ts) as t, string_agg(value::text, ',' order by ts) as v
          from readings
          where probe_id = any(${sql.param(probeIds)}::int[]) and ts >= ${from.toISOString()} and ts <= ${to.toISOString()}
          group by probe_id, metric
          order by probe_id, metric`)
      : Promise.resolve({ rows: [] }),
    d
      .select()
      .from(feedings)
      .where(and(eq(feedings.binId, binId), gte(feedings.at, feedingsFrom), lte(feedings.at, to)))
      .orderBy(asc(feedings.at)),
    probeIds.length
      ? d
          .select({ probeId: rejectedMessages.probeId, at: rejectedMessages.receivedAt, reason: rejectedMessages.reason })
          .from(rejectedMessages)
          .where(and(inArray(rejectedMessages.probeId, probeIds), gte(rejectedMessages.receivedAt, from), lte(rejectedMessages.receivedAt, to)))
      : Promise.resolve([]),
  ]);
  return {
    readings: (readingRows.rows as { probeId: number; metric: string; t: string; v: string }[]).map((r): PreviewSeriesRow => ({
      probeId: r.probeId,
      metric: r.metric,
      t: r.t.split(",").map(Number),
      v: r.v.split(",").map(Number),
    })),
    feedings: feedingRows,
    refusals: refusalRows,
  };
}
