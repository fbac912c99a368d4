import { latestOfZones } from "@/db/queries/zone-view";
import type { Who } from "@/lib/server/auth/authorize";
import { listIngredients } from "@/lib/server/ingredients/list-ingredients";
import { listBinFeedings } from "@/lib/server/logbook/list-feedings";
import { readLogbook } from "@/lib/server/logbook/read-logbook";
import { roleAllows } from "@/lib/domain/roles";
import { feedingListQuery, logbookQuery } from "@/lib/domain/validation/logbook";
import { binWithFarm } from "./bin-with-farm";

/** What a bin's page shows: the bin and its farm, each zone's latest readings, and the API's own
 * answers for its feedings, its logbook and (for those who log) the ingredient library, so the page
 * can prime the client's cache with them. Null when the bin or the farm is gone. */
export async function binPageView(who: Who, binId: string) {
  const canLog = roleAllows(who.role, "log");
  const [place, feedings, logbook, library] = await Promise.all([
    binWithFarm(who, binId),
    listBinFeedings(binId, feedingListQuery.parse({})),
    readLogbook(binId, logbookQuery.parse({})),
    canLog ? listIngredients(who) : null,
  ]);
  if (!place) return null;
  const latest = await latestOfZones(place.bin.zones.map((z) => z.id));
  return { ...place, latest, feedings, logbook, library, canLog };
}
