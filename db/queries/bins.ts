import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { bins, zones, type BinStyle, type ZoneKind } from "@/db/schema";
import { AppError } from "@/lib/domain/errors";
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

export async function addZone(binId: string, input: { kind: ZoneKind; name?: string | null }) {
  return db().transaction(async (tx) => {
    const live = await tx.select({ position: zones.position, archivedAt: zones.archivedAt }).from(zones).where(eq(zones.binId, binId));
    if (live.filter((z) => !z.archivedAt).length >= 6) throw new AppError("invalid", "A bin has at most 6 zones.", "kind");
    const position = Math.max(0, ...live.map((z) => z.position)) + 1;
    const [z] = await tx
      .insert(zones)
      .values({ binId, position, kind: input.kind, name: input.name ?? null })
      .returning();
    return z!;
  });
}

export async function updateZone(id: string, patch: Partial<typeof zones.$inferInsert>) {
  if (!hasChanges(patch)) return getZone(id);
  try {
    const [z] = await db().update(zones).set(patch).where(eq(zones.id, id)).returning();
    return z ?? null;
  } catch (e) {
    if ((e as { cause?: { code?: string }; code?: string }).cause?.code === "23505" || (e as { code?: string }).code === "23505") {
      throw new AppError("conflict", "Another zone of this bin already has that position.", "position");
    }
    throw e;
  }
}

export async function archiveZone(id: string) {
  const [z] = await db().update(zones).set({ archivedAt: new Date() }).where(eq(zones.id, id)).returning();
  return z ?? null;
}

// A log entry may name a zone only of its own bin.
export async function assertZoneInBin(binId: string, zoneId: string | null, ex: Pick<ReturnType<typeof db>, "select"> = db()) {
  if (!zoneId) return;
  const [z] = await ex.select({ binId: zones.binId }).from(zones).where(eq(zones.id, zoneId));
  if (z?.binId !== binId) throw new AppError("invalid", "That zone is not in this bin.", "zoneId");
}
