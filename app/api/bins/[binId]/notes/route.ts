import { insertNote, listNotes } from "@/db/queries/logbook";
import { logEntryRoutes } from "@/lib/web/api/log-entry-routes";
import { noteCreate } from "@/lib/domain/validation/log-entries";

// GET /api/bins/[binId]/notes — newest first; POST — log one (keepers and owners)
export const { GET, POST } = logEntryRoutes({ schema: noteCreate, insert: insertNote, list: listNotes, many: "notes", one: "note" });
