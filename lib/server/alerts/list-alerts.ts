import { listAlerts } from "@/db/queries/alerts";
import type { Who } from "@/lib/server/auth/authorize";
import type { AlertListQuery } from "@/lib/domain/validation/alerts";

/** A farm's alerts, newest first: the open ones (raised or claimed), or all. */
export async function listFarmAlerts(who: Pick<Who, "farmId">, query: AlertListQuery) {
  return listAlerts(who.farmId, { open: query.state === "open" });
}
