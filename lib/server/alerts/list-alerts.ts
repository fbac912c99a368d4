import { listAlerts } from "@/db/queries/alerts";
import { listBins } from "@/db/queries/bins";
import { getFarm } from "@/db/queries/farms";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import type { Who } from "@/lib/server/auth/authorize";
import type { AlertListQuery } from "@/lib/domain/validation/alerts";

/** How many alerts one page of the history shows; the rest are behind "older". */
export const HISTORY_PAGE = 30;

/** One page of a farm's alerts, newest first, narrowed by state ("open" = raised or claimed;
 * "all"), bin, kind and level, with where the next older page begins (null when there is none). */
export async function alertHistoryPage(who: Pick<Who, "farmId">, query: AlertListQuery, limit = HISTORY_PAGE) {
  const rows = await listAlerts(who.farmId, {
    state: query.state === "all" ? undefined : query.state,
    binId: query.bin,
    kind: query.kind,
    level: query.level,
    before: query.before,
    beforeId: query.beforeId,
    limit: limit + 1,
  });
  const alerts = rows.slice(0, limit);
  const last = alerts.at(-1);
  // The next page starts after the last one shown, by (raise time, id): ties at one instant are kept.
  return { alerts, older: rows.length > limit && last ? { before: last.raisedAtExact, beforeId: last.alert.id } : null };
}

/** The API's list: the same filters, up to 100 at a time. */
export async function listFarmAlerts(who: Pick<Who, "farmId">, query: AlertListQuery) {
  return (await alertHistoryPage(who, query, 100)).alerts;
}

/** The history page: one page of alerts, the farm's bins to filter by (archived ones too: their
 * alerts stay), and the farm's units and time zone to say values and times in. */
export async function alertHistoryView(who: Pick<Who, "farmId">, query: AlertListQuery) {
  const [page, bins, farm] = await Promise.all([alertHistoryPage(who, query), listBins(who.farmId, { includeArchived: true }), getFarm(who.farmId)]);
  return {
    ...page,
    bins: bins.map((b) => ({ id: b.id, name: b.name })),
    unitSystem: farm?.unitSystem ?? "metric",
    timezone: timeZoneOrUtc(farm?.timezone ?? "UTC"),
  };
}
