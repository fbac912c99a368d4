import { listLogbook } from "@/db/queries/logbook";
import type { LogbookQuery } from "@/lib/domain/validation/logbook";

/** Every kind of entry of one bin (feedings with their items, water, shifts, harvests, notes, samples), merged newest first, with who. */
export async function readLogbook(binId: string, q: LogbookQuery) {
  return { entries: await listLogbook(binId, q) };
}
