import { insertNote } from "@/db/queries/logbook";
import type { Who } from "@/lib/server/auth/authorize";
import type { NoteCreate } from "@/lib/domain/validation/log-entries";
import { entryRow } from "./entry-row";

/** A keeper or owner writes a note in the bin's logbook; a clientKey the farm used before answers the entry stored
 * then (`created` false). */
export async function logNote(who: Pick<Who, "farmId" | "userId">, binId: string, input: NoteCreate & { clientKey?: string }) {
  const { row, created } = await insertNote(await entryRow(who, binId, input));
  return { answer: { note: row }, created };
}
