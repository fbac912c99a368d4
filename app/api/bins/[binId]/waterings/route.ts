import { insertWatering, listWaterings } from "@/db/queries/logbook";
import { logEntryRoutes } from "@/lib/web/api/log-entry-routes";
import { wateringCreate } from "@/lib/domain/validation/log-entries";

// GET /api/bins/[binId]/waterings — newest first; POST — log one (keepers and owners)
export const { GET, POST } = logEntryRoutes({ schema: wateringCreate, insert: insertWatering, list: listWaterings, many: "waterings", one: "watering" });
