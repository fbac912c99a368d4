import { listHarvests, listNotes, listWaterings } from "@/db/queries/logbook";
import type { LogEntryListQuery } from "@/lib/domain/validation/log-entries";

const LISTS = { waterings: listWaterings, harvests: listHarvests, notes: listNotes };
type Lists = typeof LISTS;

/** One kind of a bin's logbook entries, newest first, each with who logged it, under the kind's plural. */
export async function listEntries<K extends keyof Lists>(kind: K, binId: string, q: LogEntryListQuery) {
  const rows = await LISTS[kind](binId, q);
  return { [kind]: rows } as { [P in K]: Awaited<ReturnType<Lists[P]>> };
}
