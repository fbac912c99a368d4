import { listAlerts } from "@/db/queries/alerts";
import { listProbesOfBin } from "@/db/queries/bins";
import { latestOfZones } from "@/db/queries/zone-view";
import type { Who } from "@/lib/server/auth/authorize";
import { listIngredients } from "@/lib/server/ingredients/list-ingredients";
import { readLogbook } from "@/lib/server/logbook/read-logbook";
import { roleAllows } from "@/lib/domain/roles";
import { logbookQuery } from "@/lib/domain/validation/logbook";
import { binWithFarm } from "./bin-with-farm";
import { readBinCycle } from "./bin-cycle-view";

/** What a bin's page shows: the bin and its farm, each zone's latest readings, the open alerts, the
 * bin's cycle (next feeding, harvest side, yields), the API's own answer for its logbook and (for
 * those who log) the ingredient library and the bin's probes, so the page can prime the client's
 * cache. Null when the bin or the farm is gone. */
export async function binPageView(who: Who, binId: string, now = new Date()) {
  const canLog = roleAllows(who.role, "log");
  const [place, logbook, library, probes] = await Promise.all([
    binWithFarm(who, binId),
    readLogbook(binId, logbookQuery.parse({})),
    canLog ? listIngredients(who) : null,
    canLog ? listProbesOfBin(binId) : [],
  ]);
  if (!place) return null;
  const [latest, open, cycle] = await Promise.all([
    latestOfZones(place.bin.zones.map((z) => z.id)),
    listAlerts(who.farmId, { open: true, binId }),
    readBinCycle(place.bin, place.farm, now),
  ]);
  // The bin's open alerts, act now first: the page says them before any value.
  const openAlerts = open
    .map((o) => ({ ...o.alert, claimedByName: o.claimedByName, raisedWords: o.raisedMessage ?? o.alert.message }))
    .sort((a, b) => Number(b.level === "act_now") - Number(a.level === "act_now"));
  return { ...place, latest, logbook, library, probes, canLog, canManage: roleAllows(who.role, "manage"), openAlerts, cycle };
}
