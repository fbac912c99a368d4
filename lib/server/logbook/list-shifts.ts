import { listLogEntries } from "@/db/queries/logbook";
import type { LogEntryListQuery } from "@/lib/domain/validation/log-entries";

/** A bin's shifts, newest first, with who logged them. */
export async function listBinShifts(binId: string, q: LogEntryListQuery) {
  return { shifts: await listLogEntries({ binId, kinds: ["shift"], limit: q.limit }) };
}
