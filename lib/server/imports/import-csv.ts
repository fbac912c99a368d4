import { createHash } from "node:crypto";
import { listFarmProbes, storeImport, type ImportRecord } from "@/db/queries/imports";
import type { Who } from "@/lib/server/auth/authorize";
import { mapRows, MAX_REPORTED, plainMapping, readImportFile } from "@/lib/domain/csv-import";
import { AppError } from "@/lib/domain/errors";
import { REASONS_KEPT, reasonLines } from "@/lib/domain/telemetry";
import type { ImportUpload } from "@/lib/domain/validation/imports";

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

/**
 * An owner imports a logger CSV: the good rows are stored and the import is recorded with its
 * report. The same file with the same mapping is a no-op that answers with the earlier import; any
 * other repeat adds nothing either, because a reading already stored is skipped by its key.
 */
export async function importCsv(who: Pick<Who, "farmId" | "userId">, upload: ImportUpload, now = Date.now()): Promise<ImportOutcome> {
  const { mapping } = upload;
  const file = readImportFile(upload.bytes, mapping);
  if (!file.ok) throw new AppError(file.refusal.code, file.refusal.message, file.refusal.field);
  const codes = new Map((await listFarmProbes(who.farmId)).map((p) => [p.code, p.id]));
  if (mapping.probeCode && !codes.has(mapping.probeCode)) throw new AppError("invalid", `There is no probe "${mapping.probeCode}" on this farm.`, "probeCode");

  const mapped = mapRows(file.table, mapping, { probes: codes, now });
  const report = mapped.bad.slice(0, MAX_REPORTED);
  const firstBad = mapped.bad[0];
  // One row for the file's refused lines, as for a message; the import's report lists them.
  const rejection = firstBad && {
    farmId: who.farmId,
    probeId: null,
    source: "csv" as const,
    topic: null,
    reason: reasonLines(
      mapped.bad.slice(0, REASONS_KEPT).map((b) => `line ${b.line}: ${b.reason}`),
      mapped.bad.length,
    ),
    records: mapped.bad.length,
    excerpt: `${upload.fileName.slice(0, 120)} line ${firstBad.line}`,
  };
  const r = await storeImport(
    {
      farmId: who.farmId,
      byUserId: who.userId,
      fileName: upload.fileName.slice(0, 255),
      fileSha256: createHash("sha256").update(upload.bytes).digest("hex"),
      mapping: plainMapping(mapping),
      rowsTotal: mapped.total,
      rowsRejected: mapped.bad.length,
      report,
    },
    mapped.readings.map(({ probeId, metric, ts, value }) => ({ probeId, metric, ts, value })),
    rejection ?? null,
  );
  if ("duplicate" in r) {
    const exact = r.duplicate;
    return { duplicate: true, import: exact, alreadyStored: 0, repeats: 0, reportTruncated: exact.rowsRejected > exact.report.length, earlier: [] };
  }
  return {
    duplicate: false,
    import: r.stored,
    alreadyStored: mapped.readings.length - r.inserted,
    repeats: mapped.repeats,
    reportTruncated: mapped.bad.length > report.length,
    earlier: r.earlier,
  };
}
