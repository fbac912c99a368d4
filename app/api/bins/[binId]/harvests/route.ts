import { insertHarvest, listHarvests } from "@/db/queries/logbook";
import { logEntryRoutes } from "@/lib/web/api/log-entry-routes";
import { harvestCreate } from "@/lib/domain/validation/log-entries";

// GET /api/bins/[binId]/harvests — newest first; POST — log one (keepers and owners)
export const { GET, POST } = logEntryRoutes({ schema: harvestCreate, insert: insertHarvest, list: listHarvests, many: "harvests", one: "harvest" });
