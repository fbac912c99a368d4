import { listAlerts } from "@/db/queries/alerts";
import { latestOfZones } from "@/db/queries/zone-view";
import type { Who } from "@/lib/server/auth/authorize";
import { listIngredients } from "@/lib/server/ingredients/list-ingredients";
import { listBinFeedings } from "@/lib/server/logbook/list-feedings";
import { readLogbook } from "@/lib/server/logbook/read-logbook";
import { roleAllows } from "@/lib/domain/roles";
import { feedingListQuery, logbookQuery } from "@/lib/domain/validation/logbook";
import { binWithFarm } from "./bin-with-farm";

/** What a bin's page shows: the bin and its farm, each zone's latest readings, and the API's own
 * open alerts, its answers for its feedings, its logbook and (for those who log) the ingredient library, so the page
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
  const [latest, open] = await Promise.all([latestOfZones(place.bin.zones.map((z) => z.id)), listAlerts(who.farmId, { open: true, binId })]);
  // The bin's open alerts, act now first: the page says them before any value.
  const openAlerts = open
    .map((o) => ({ ...o.alert, claimedByName: o.claimedByName, raisedWords: o.raisedMessage ?? o.alert.message }))
    .sort((a, b) => Number(b.level === "act_now") - Number(a.level === "act_now"));
  return { ...place, latest, feedings, logbook, library, canLog, openAlerts };
}
