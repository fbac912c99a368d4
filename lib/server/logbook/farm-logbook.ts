import { listBins } from "@/db/queries/bins";
import { getFarm } from "@/db/queries/farms";
import { listFarmZones, listLogEntries, type LogbookFilter } from "@/db/queries/logbook";
import { listTeam } from "@/db/queries/team";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import { logbookCursor, type FarmLogbookQuery, type LogbookExportQuery } from "@/lib/domain/validation/logbook-filters";
import type { Who } from "@/lib/server/auth/authorize";
import { farmDayRange } from "./day-range";

/** How many entries one page of the farm logbook shows; the rest are behind "older entries". */
export const LOGBOOK_PAGE = 30;

/** The farm's settings an export or a page says things in. */
export async function farmSettings(farmId: string) {
  const farm = await getFarm(farmId);
  return { name: farm?.name ?? "farm", unitSystem: farm?.unitSystem ?? "metric", timezone: timeZoneOrUtc(farm?.timezone ?? "UTC") };
}

/** The filters in the database's terms: the farm's own entries only, farm-local days as instants. */
export function logbookFilter(farmId: string, q: Omit<LogbookExportQuery, "format">, timezone: string, limit: number): LogbookFilter {
  return {
    farmId,
    binId: q.bin,
    zoneId: q.zone,
    byUserId: q.who,
    kinds: q.kind ? [q.kind] : undefined,
    ...farmDayRange(q.from, q.to, timezone),
    limit,
  };
}

/** One page of the farm's logbook, newest first, narrowed by kind, bin, zone, who and farm-local
 * days, with the cursor of the next older page (null when there is none). */
export async function farmLogbookPage(who: Pick<Who, "farmId">, q: FarmLogbookQuery, limit = q.limit) {
  const { timezone } = await farmSettings(who.farmId);
  const rows = await listLogEntries({ ...logbookFilter(who.farmId, q, timezone, limit + 1), before: q.before });
  const entries = rows.slice(0, limit);
  return { entries, older: rows.length > limit ? logbookCursor(entries.at(-1)!) : null };
}

/** The farm logbook page: a page of entries, and what its filters and words need: the farm's bins
 * and zones (archived ones too: their entries stay), its people, units and time zone. */
export async function farmLogbookView(who: Pick<Who, "farmId">, q: FarmLogbookQuery) {
  const [page, bins, zones, team, farm] = await Promise.all([
    farmLogbookPage(who, q, LOGBOOK_PAGE),
    listBins(who.farmId, { includeArchived: true }),
    listFarmZones(who.farmId),
    listTeam(who.farmId),
    farmSettings(who.farmId),
  ]);
  return {
    ...page,
    bins: bins.map((b) => ({ id: b.id, name: b.name, archived: b.archivedAt != null, zones: b.zones.map((z) => ({ id: z.id, kind: z.kind, name: z.name })) })),
    zones: zones.map((z) => ({ id: z.id, binId: z.binId, kind: z.kind, name: z.name })),
    people: team.map((p) => ({ id: p.userId, name: p.name })),
    unitSystem: farm.unitSystem,
    timezone: farm.timezone,
  };
}
