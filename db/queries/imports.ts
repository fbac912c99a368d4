import { createHash } from "node:crypto";
import { and, asc, desc, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { imports, probes } from "@/db/schema";
import { checkMapping, decodeFile, mapRows, readCsv, MAX_IMPORT_ROWS, MAX_REPORTED, type BadRow, type ImportMapping } from "@/lib/domain/csv-import";
import { AppError } from "@/lib/domain/errors";
import { REASONS_KEPT, reasonLines } from "@/lib/domain/telemetry";
import { insertReadings, recordRejections } from "./readings";

export type ImportRecord = typeof imports.$inferSelect;

export type ImportOutcome = {
  /** True when this file was imported before with the same mapping: nothing was done. */
  duplicate: boolean;
  import: ImportRecord;
  /** Good rows whose reading was already stored (an earlier import or the probe itself). */
  alreadyStored: number;
  /** Rows repeated inside the file with the same value. */
  repeats: number;
  /** The report lists the first MAX_REPORTED bad rows; rowsRejected counts them all. */
  reportTruncated: boolean;
  /** Earlier imports of the same file with another mapping. */
  earlier: { id: string; createdAt: Date }[];
};

const CHUNK = 5000;

export async function listImports(farmId: string, limit = 20): Promise<ImportRecord[]> {
  return db().select().from(imports).where(eq(imports.farmId, farmId)).orderBy(desc(imports.createdAt)).limit(limit);
}

export async function listFarmProbes(farmId: string) {
  return db().select({ id: probes.id, code: probes.code, label: probes.label }).from(probes).where(eq(probes.farmId, farmId)).orderBy(asc(probes.code));
}

/**
 * Stores the good rows of a logger CSV and records the import with its report, in one transaction.
 * The same file with the same mapping is a no-op that answers with the earlier import; any other
 * repeat adds nothing either, because a reading already stored is skipped by its key.
 */
export async function importCsv(input: {
  farmId: string;
  userId: string;
  fileName: string;
  bytes: Uint8Array;
  mapping: ImportMapping;
  now?: number;
}): Promise<ImportOutcome> {
  const sha = createHash("sha256").update(input.bytes).digest("hex");
  const table = readCsv(decodeFile(input.bytes));
  if (table.header.length === 0) throw new AppError("invalid", "The file is empty: it needs a header line and rows.", "file");
  if (table.rows.length > MAX_IMPORT_ROWS) {
    throw new AppError("too_large", `The file has ${table.rows.length} rows; import at most ${MAX_IMPORT_ROWS} at a time.`, "file");
  }
  const wrong = checkMapping(table.header, input.mapping);
  if (wrong) throw new AppError("invalid", wrong.message, wrong.field);

  const farmProbes = await listFarmProbes(input.farmId);
  const codes = new Map(farmProbes.map((p) => [p.code, p.id]));
  if (input.mapping.probeCode && !codes.has(input.mapping.probeCode)) {
    throw new AppError("invalid", `There is no probe "${input.mapping.probeCode}" on this farm.`, "probeCode");
  }

  return db().transaction(async (tx) => {
    // Two uploads of one file at once: the second waits here, then finds the first.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`${input.farmId}:${sha}`}))`);
    const same = await tx
      .select()
      .from(imports)
      .where(and(eq(imports.farmId, input.farmId), eq(imports.fileSha256, sha)))
      .orderBy(desc(imports.createdAt));
    const exact = same.find((i) => sameMapping(i.mapping, input.mapping));
    if (exact) {
      return { duplicate: true, import: exact, alreadyStored: 0, repeats: 0, reportTruncated: exact.rowsRejected > exact.report.length, earlier: [] };
    }

    const mapped = mapRows(table, input.mapping, { probes: codes, now: input.now ?? Date.now() });
    let inserted = 0;
    for (let i = 0; i < mapped.readings.length; i += CHUNK) {
      const chunk = mapped.readings.slice(i, i + CHUNK).map(({ probeId, metric, ts, value }) => ({ probeId, metric, ts, value }));
      inserted += (await insertReadings(chunk, tx)).inserted;
    }
    const report: BadRow[] = mapped.bad.slice(0, MAX_REPORTED);
    // One row for the file's refused lines, as for a message; the import's report lists them.
    const firstBad = mapped.bad[0];
    if (firstBad) {
      const lines = mapped.bad.slice(0, REASONS_KEPT).map((b) => `line ${b.line}: ${b.reason}`);
      await recordRejections(
        [
          {
            farmId: input.farmId,
            probeId: null,
            source: "csv",
            topic: null,
            reason: reasonLines(lines, mapped.bad.length),
            records: mapped.bad.length,
            excerpt: `${input.fileName.slice(0, 120)} line ${firstBad.line}`,
          },
        ],
        tx,
      );
    }
    const [row] = await tx
      .insert(imports)
      .values({
        farmId: input.farmId,
        byUserId: input.userId,
        fileName: input.fileName.slice(0, 255),
        fileSha256: sha,
        mapping: plainMapping(input.mapping),
        rowsTotal: mapped.total,
        rowsStored: inserted,
        rowsRejected: mapped.bad.length,
        report,
      })
      .returning();
    return {
      duplicate: false,
      import: row!,
      alreadyStored: mapped.readings.length - inserted,
      repeats: mapped.repeats,
      reportTruncated: mapped.bad.length > report.length,
      earlier: same.map((i) => ({ id: i.id, createdAt: i.createdAt })),
    };
  });
}

/** The mapping as stored: only the choices made (undefined fields dropped). */
const plainMapping = (m: ImportMapping) => JSON.parse(JSON.stringify(m)) as Record<string, string>;

// Compared key by key, so the same choices match whatever order they were sent in.
function sameMapping(stored: Record<string, string>, m: ImportMapping): boolean {
  const a = plainMapping(m);
  const keys = new Set([...Object.keys(stored), ...Object.keys(a)]);
  return [...keys].every((k) => stored[k] === a[k]);
}
