import { and, asc, desc, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { imports, probes } from "@/db/schema";
import { sameMapping } from "@/lib/domain/csv-import";
import { markDailyRollupsStale } from "./daily-rollups";
import { insertReadings, recordRejections, type ReadingInput, type RejectionInput } from "./readings";

export type ImportRecord = typeof imports.$inferSelect;
type ImportRow = Omit<typeof imports.$inferInsert, "id" | "createdAt" | "rowsStored"> & { mapping: Record<string, string> };

const CHUNK = 5000;

export async function listImports(farmId: string, limit = 20): Promise<ImportRecord[]> {
  return db().select().from(imports).where(eq(imports.farmId, farmId)).orderBy(desc(imports.createdAt)).limit(limit);
}

export async function listFarmProbes(farmId: string) {
  return db().select({ id: probes.id, code: probes.code, label: probes.label }).from(probes).where(eq(probes.farmId, farmId)).orderBy(asc(probes.code));
}

export type StoredImport = { duplicate: ImportRecord } | { stored: ImportRecord; inserted: number; earlier: { id: string; createdAt: Date }[] };

/**
 * Stores a file's readings, its rejection row and the import with its report, in one transaction;
 * `duplicate` (nothing stored) when the same file came before with the same mapping. `inserted`
 * leaves out readings already stored, which are skipped by their key; `earlier` lists imports of
 * the same file with another mapping.
 */
export async function storeImport(row: ImportRow, readings: readonly ReadingInput[], rejection: RejectionInput | null): Promise<StoredImport> {
  return db().transaction(async (tx) => {
    // Two uploads of one file at once: the second waits here, then finds the first.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`${row.farmId}:${row.fileSha256}`}))`);
    const same = await tx
      .select()
      .from(imports)
      .where(and(eq(imports.farmId, row.farmId), eq(imports.fileSha256, row.fileSha256)))
      .orderBy(desc(imports.createdAt));
    const exact = same.find((i) => sameMapping(i.mapping, row.mapping));
    if (exact) return { duplicate: exact };

    let inserted = 0;
    for (let i = 0; i < readings.length; i += CHUNK) inserted += (await insertReadings(readings.slice(i, i + CHUNK), tx)).inserted;
    // Days of the year charts already made from the hourly rollups are redone from the oldest one.
    if (inserted > 0) {
      const oldest = readings.reduce((m, r) => Math.min(m, r.ts.getTime()), Infinity);
      await markDailyRollupsStale([...new Set(readings.map((r) => r.probeId))], new Date(oldest), tx);
    }
    if (rejection) await recordRejections([rejection], tx);
    const [stored] = await tx
      .insert(imports)
      .values({ ...row, rowsStored: inserted })
      .returning();
    return { stored: stored!, inserted, earlier: same.map((i) => ({ id: i.id, createdAt: i.createdAt })) };
  });
}
