import { and, desc, eq, gte, inArray, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { alerts, bins, farms, probes, users, zones } from "@/db/schema";

export type Latest = { ts: string; value: number };
export type ZoneLatest = Partial<Record<"temperature" | "moisture" | "ammonia", Latest>>;

// Newest temperature, moisture and ammonia per zone: one lateral lookup per probe and metric
// through the readings key; when a zone has several probes the newest reading wins.
export async function latestOfZones(zoneIds: string[]): Promise<Map<string, ZoneLatest>> {
  const out = new Map<string, ZoneLatest>(zoneIds.map((id) => [id, {}]));
  if (zoneIds.length === 0) return out;
  const r = await db().execute(sql`
    select distinct on (p.zone_id, m.metric) p.zone_id as "zoneId", m.metric::text as metric, r.ts, r.value
    from probes p
    cross join unnest(array['temperature','moisture','ammonia']::metric[]) as m(metric)
    join lateral (
      select ts, value from readings where probe_id = p.id and metric = m.metric order by ts desc limit 1
    ) r on true
    where p.zone_id = any(${sql.param(zoneIds)}::uuid[]) and p.archived_at is null
    order by p.zone_id, m.metric, r.ts desc`);
  for (const row of r.rows as { zoneId: string; metric: keyof ZoneLatest; ts: Date; value: number }[]) {
    out.get(row.zoneId)![row.metric] = { ts: new Date(row.ts).toISOString(), value: Number(row.value) };
  }
  return out;
}

/** A zone with its bin, the farm's display settings, what its probes measure and its latest readings. */
export async function getZoneView(zoneId: string) {
  const [row] = await db()
    .select({ zone: zones, bin: bins, unitSystem: farms.unitSystem, timezone: farms.timezone })
    .from(zones)
    .innerJoin(bins, eq(bins.id, zones.binId))
    .innerJoin(farms, eq(farms.id, bins.farmId))
    .where(eq(zones.id, zoneId));
  if (!row) return null;
  const placed = await db()
    .select({ metrics: probes.metrics })
    .from(probes)
    .where(and(eq(probes.zoneId, zoneId), isNull(probes.archivedAt)));
  const latest = (await latestOfZones([zoneId])).get(zoneId) ?? {};
  return { ...row, probeCount: placed.length, metrics: [...new Set(placed.flatMap((p) => p.metrics))], latest };
}

/** The zone's open alerts and those raised since `since`, open ones first, then newest first. */
export async function listZoneAlerts(zoneId: string, opts: { since: Date; limit?: number }) {
  const open = inArray(alerts.state, ["raised", "claimed"]);
  return db()
    .select({
      id: alerts.id,
      kind: alerts.kind,
      level: alerts.level,
      state: alerts.state,
      message: alerts.message,
      raisedAt: alerts.raisedAt,
      claimedAt: alerts.claimedAt,
      settledAt: alerts.settledAt,
      claimedByName: users.name,
    })
    .from(alerts)
    .leftJoin(users, eq(users.id, alerts.claimedBy))
    .where(and(eq(alerts.zoneId, zoneId), or(open, gte(alerts.raisedAt, opts.since))))
    .orderBy(sql`${alerts.state} = 'settled'`, desc(alerts.raisedAt))
    .limit(opts.limit ?? 20);
}
export type ZoneAlert = Awaited<ReturnType<typeof listZoneAlerts>>[number];
