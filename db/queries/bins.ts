import { and, asc, eq, gte, isNull, max, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { bins, feedings, harvests, probes, shifts, zones, type BinStyle, type Zone, type ZoneKind } from "@/db/schema";
import { hasChanges } from "./patch";

export async function listBins(farmId: string, opts: { includeArchived?: boolean } = {}) {
  const where = opts.includeArchived ? eq(bins.farmId, farmId) : and(eq(bins.farmId, farmId), isNull(bins.archivedAt));
  const rows = await db().select().from(bins).where(where).orderBy(asc(bins.name));
  const zs = rows.length ? await listZonesOfBins(rows.map((b) => b.id)) : [];
  return rows.map((b) => ({ ...b, zones: zs.filter((z) => z.binId === b.id) }));
}

export async function listZonesOfBins(binIds: string[]) {
  return db()
    .select()
    .from(zones)
    .where(and(sql`${zones.binId} = any(${sql.param(binIds)}::uuid[])`, isNull(zones.archivedAt)))
    .orderBy(asc(zones.binId), asc(zones.position));
}

export async function getBin(id: string) {
  const [b] = await db().select().from(bins).where(eq(bins.id, id));
  if (!b) return null;
  return { ...b, zones: await listZonesOfBins([b.id]) };
}

export async function createBin(
  farmId: string,
  input: {
    name: string;
    style: BinStyle;
    species: string;
    lengthCm?: number | null;
    widthCm?: number | null;
    depthCm?: number | null;
    notes?: string | null;
    zoneKinds: ZoneKind[];
  },
) {
  const { zoneKinds, ...bin } = input;
  return db().transaction(async (tx) => {
    const [b] = await tx
      .insert(bins)
      .values({ ...bin, farmId })
      .returning();
    const zs = await tx
      .insert(zones)
      .values(zoneKinds.map((kind, i) => ({ binId: b!.id, position: i + 1, kind })))
      .returning();
    return { ...b!, zones: zs };
  });
}

export async function updateBin(id: string, patch: Partial<typeof bins.$inferInsert>) {
  if (!hasChanges(patch)) {
    const [b] = await db().select().from(bins).where(eq(bins.id, id));
    return b ?? null;
  }
  const [b] = await db().update(bins).set(patch).where(eq(bins.id, id)).returning();
  return b ?? null;
}

export async function archiveBin(id: string) {
  const [b] = await db().update(bins).set({ archivedAt: new Date() }).where(eq(bins.id, id)).returning();
  return b ?? null;
}

export async function getZone(id: string) {
  const [z] = await db().select().from(zones).where(eq(zones.id, id));
  return z ?? null;
}

/** The new zone at the harvest end, or null when the bin already has `maxLive` zones in use. */
export async function addZone(binId: string, input: { kind: ZoneKind; name?: string | null }, maxLive: number) {
  return db().transaction(async (tx) => {
    const live = await tx.select({ position: zones.position, archivedAt: zones.archivedAt }).from(zones).where(eq(zones.binId, binId));
    if (live.filter((z) => !z.archivedAt).length >= maxLive) return null;
    const position = Math.max(0, ...live.map((z) => z.position)) + 1;
    const [z] = await tx
      .insert(zones)
      .values({ binId, position, kind: input.kind, name: input.name ?? null })
      .returning();
    return z!;
  });
}

export type ZoneChange = { changed: Zone | null } | { refused: "position_taken" };

/** The zone as changed (null when it is gone), or a refusal when another zone of its bin holds that position. */
export async function updateZone(id: string, patch: Partial<typeof zones.$inferInsert>): Promise<ZoneChange> {
  if (!hasChanges(patch)) return { changed: await getZone(id) };
  try {
    const [z] = await db().update(zones).set(patch).where(eq(zones.id, id)).returning();
    return { changed: z ?? null };
  } catch (e) {
    // 23505 unique_violation (PostgreSQL manual, appendix A) on the bin's (bin_id, position) key.
    if ((e as { cause?: { code?: string }; code?: string }).cause?.code === "23505" || (e as { code?: string }).code === "23505") {
      return { refused: "position_taken" };
    }
    throw e;
  }
}

export async function archiveZone(id: string) {
  const [z] = await db().update(zones).set({ archivedAt: new Date() }).where(eq(zones.id, id)).returning();
  return z ?? null;
}

/** The bin a zone belongs to, or null when there is no such zone. */
export async function binOfZone(zoneId: string): Promise<string | null> {
  const [z] = await db().select({ binId: zones.binId }).from(zones).where(eq(zones.id, zoneId));
  return z?.binId ?? null;
}

/** When each bin of a farm was last fed, in any zone: Today and the digest count the next feeding from it. */
export async function lastFeedingsOfFarm(farmId: string): Promise<Map<string, Date>> {
  const rows = await db()
    .select({ binId: feedings.binId, at: max(feedings.at) })
    .from(feedings)
    .where(eq(feedings.farmId, farmId))
    .groupBy(feedings.binId);
  return new Map(rows.filter((r) => r.at).map((r) => [r.binId, new Date(r.at!)]));
}

/** The live probes placed in a bin's zones, for a form that records a sample beside one. */
export async function listProbesOfBin(binId: string) {
  return db()
    .select({ id: probes.id, code: probes.code, label: probes.label, zoneId: probes.zoneId })
    .from(probes)
    .innerJoin(zones, eq(zones.id, probes.zoneId))
    .where(and(eq(zones.binId, binId), isNull(zones.archivedAt), isNull(probes.archivedAt)))
    .orderBy(asc(zones.position), asc(probes.code));
}

/** What a bin's cycle is told from: its last feeding; for its harvest side (null: none) the last
 * feeding there or over the whole bin, the last shift of material into it and its daily mean
 * moisture over [since, until); and its harvests since `harvestsSince`, oldest first. */
export async function getBinCycleFacts(binId: string, harvestZoneId: string | null, w: { since: Date; until: Date; harvestsSince: Date }) {
  const d = db();
  const [[fed], sideFed, shiftIn, daily, harvested] = await Promise.all([
    d
      .select({ at: max(feedings.at) })
      .from(feedings)
      .where(eq(feedings.binId, binId)),
    harvestZoneId
      ? d
          .select({ at: max(feedings.at) })
          .from(feedings)
          .where(and(eq(feedings.binId, binId), or(eq(feedings.zoneId, harvestZoneId), isNull(feedings.zoneId))))
      : Promise.resolve([]),
    harvestZoneId
      ? d
          .select({ at: max(shifts.at) })
          .from(shifts)
          .where(and(eq(shifts.binId, binId), eq(shifts.toZoneId, harvestZoneId)))
      : Promise.resolve([]),
    // Daily means from the hourly rollups, in 24-hour windows ending now (date_bin has no Drizzle
    // word), each dated at the mean of its hours so a part-day window sits where its readings are.
    harvestZoneId
      ? d.execute(sql`
          select to_timestamp(avg(extract(epoch from r.hour)) + 1800) as at, (sum(r.sum) / sum(r.count))::float8 as pct
          from reading_rollups r join probes p on p.id = r.probe_id
          where p.zone_id = ${harvestZoneId} and p.archived_at is null and r.metric = 'moisture'
            and r.hour >= ${w.since.toISOString()}::timestamptz and r.hour < ${w.until.toISOString()}::timestamptz
          group by date_bin('1 day', r.hour, ${w.until.toISOString()}::timestamptz)
          order by 1`)
      : Promise.resolve({ rows: [] }),
    d
      .select({ at: harvests.at, massKg: harvests.massKg })
      .from(harvests)
      .where(and(eq(harvests.binId, binId), gte(harvests.at, w.harvestsSince)))
      .orderBy(asc(harvests.at)),
  ]);
  const at = (v: Date | string | null | undefined) => (v == null ? null : new Date(v));
  return {
    lastFeedingAt: at(fed?.at),
    harvestSide: harvestZoneId
      ? {
          lastFeedingAt: at(sideFed[0]?.at),
          lastShiftInAt: at(shiftIn[0]?.at),
          moisture: (daily.rows as { at: Date | string; pct: number }[]).map((r) => ({ at: new Date(r.at), pct: Number(r.pct) })),
        }
      : null,
    harvests: harvested,
  };
}
