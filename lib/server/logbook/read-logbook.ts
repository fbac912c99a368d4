import { listLogbook } from "@/db/queries/logbook";
import type { LogbookQuery } from "@/lib/domain/validation/logbook";

/** Feedings, waterings, harvests, notes and samples of one bin, merged newest first, with who. */
export async function readLogbook(binId: string, q: LogbookQuery) {
  return { entries: await listLogbook(binId, q) };
}
