import { and, eq, gte, inArray, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { alerts, bins, farms, feedings, probes, rejectedMessages, rules, zones } from "@/db/schema";

// Everything the rules need to evaluate one zone, read in a handful of statements.
type Windows = { readingsMs: number; feedingsMs: number; refusalsMs: number };
type RuleRowOf = typeof rules.$inferSelect;

export async function loadZoneRuleContext(
  zoneId: string,
  now: Date,
  opts: { windows: (species: string, ruleRows: RuleRowOf[], binId: string) => Windows; readings?: boolean },
) {
  const d = db();
  const [z] = await d
    .select({ zone: zones, bin: bins, farm: farms })
    .from(zones)
    .innerJoin(bins, eq(bins.id, zones.binId))
    .innerJoin(farms, eq(farms.id, bins.farmId))
    .where(eq(zones.id, zoneId));
  if (!z || z.zone.archivedAt || z.bin.archivedAt) return null;
  const zoneProbes = await d
    .select()
    .from(probes)
    .where(and(eq(probes.zoneId, zoneId), isNull(probes.archivedAt)));
  const probeIds = zoneProbes.map((p) => p.id);
  const since = (ms: number) => new Date(now.getTime() - ms);
  const ruleRows = await d.select().from(rules).where(eq(rules.farmId, z.bin.farmId));
  const windows = opts.windows(z.bin.species, ruleRows, z.bin.id);
  const [readingRows, feedingRows, refusalRows, openRows, zoneCountRows] = await Promise.all([
    probeIds.length && opts.readings !== false
      ? // At most one reading per series and minute, the last of it: the rules fit rates and trends over
        // an hour or more and hold a state for minutes (lib/domain/rules/params.ts), so a probe that
        // reports every few seconds says nothing more to them than one that reports every minute,
        // and it would otherwise send days of its readings into every evaluation of its zone.
        d.execute(sql`
          select distinct on (probe_id, metric, date_trunc('minute', ts)) probe_id as "probeId", metric::text as metric, ts, value from readings
          where probe_id = any(${sql.param(probeIds)}::int[]) and ts >= ${since(windows.readingsMs).toISOString()} and ts <= ${now.toISOString()}
          order by probe_id, metric, date_trunc('minute', ts), ts desc`)
      : Promise.resolve({ rows: [] }),
    d
      .select()
      .from(feedings)
      .where(and(eq(feedings.binId, z.bin.id), gte(feedings.at, since(windows.feedingsMs)))),
    probeIds.length
      ? d
          .select({ probeId: rejectedMessages.probeId, at: rejectedMessages.receivedAt, reason: rejectedMessages.reason })
          .from(rejectedMessages)
          .where(and(inArray(rejectedMessages.probeId, probeIds), gte(rejectedMessages.receivedAt, since(windows.refusalsMs))))
      : Promise.resolve([]),
    d
      .select()
      .from(alerts)
      .where(
        and(inArray(alerts.state, ["raised", "claimed"]), or(eq(alerts.zoneId, zoneId), probeIds.length ? inArray(alerts.probeId, probeIds) : sql`false`)),
      ),
    // A feeding to one zone goes on that zone's share of the bed.
    d
      .select({ n: sql<number>`count(*)::int` })
      .from(zones)
      .where(and(eq(zones.binId, z.bin.id), isNull(zones.archivedAt))),
  ]);
  return {
    ...z,
    probes: zoneProbes,
    readings: readingRows.rows as { probeId: number; metric: string; ts: Date; value: number }[],
    rules: ruleRows,
    feedings: feedingRows,
    refusals: refusalRows,
    openAlerts: openRows,
    zoneCount: zoneCountRows[0]?.n ?? 1,
  };
}

// Zones that have live probes: the minute sweep looks at these for silence.
export async function listMonitoredZones() {
  const rows = await db()
    .selectDistinct({ zoneId: probes.zoneId })
    .from(probes)
    .innerJoin(zones, eq(zones.id, probes.zoneId))
    .innerJoin(bins, eq(bins.id, zones.binId))
    .where(and(isNull(probes.archivedAt), isNull(zones.archivedAt), isNull(bins.archivedAt)));
  return rows.map((r) => r.zoneId!).filter(Boolean);
}

export async function zonesOfProbes(probeIds: number[]) {
  if (!probeIds.length) return [];
  const rows = await db().selectDistinct({ zoneId: probes.zoneId }).from(probes).where(inArray(probes.id, probeIds));
  return rows.map((r) => r.zoneId).filter((z): z is string => !!z);
}
