import { listFeedings } from "@/db/queries/feedings";
import type { FeedingListQuery } from "@/lib/domain/validation/logbook";

/** A bin's feedings, newest first, each with its items and who logged it (the logbook and chart marks). */
export async function listBinFeedings(binId: string, q: FeedingListQuery) {
  return { feedings: await listFeedings(binId, q) };
}
