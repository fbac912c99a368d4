import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { bins, zones, type BinStyle, type Zone, type ZoneKind } from "@/db/schema";
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
