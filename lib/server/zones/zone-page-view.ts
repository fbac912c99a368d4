import { getBin } from "@/db/queries/bins";
import { getZoneView, listZoneAlerts } from "@/db/queries/zone-view";
import type { Who } from "@/lib/server/auth/authorize";
import { listBinFeedings } from "@/lib/server/logbook/list-feedings";
import { binOverrides } from "@/lib/server/rules/bin-overrides";
import { getZoneSeries } from "@/lib/server/series/zone-series";
import { resolveRules } from "@/lib/domain/rules";
import { getSpecies } from "@/lib/domain/species";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import { feedingListQuery } from "@/lib/domain/validation/logbook";
import { seriesQuery } from "@/lib/domain/validation/series";

const ALERT_DAYS = 30;

/** What a zone's page shows: the zone, its bin and the bin's other zones, the farm's display
 * settings, the latest readings and the species' comfort; a chart per metric the zone measures
 * (ammonia only where a probe reports it) with the API's own answers for the last 24 h and the
 * bin's feedings; the ammonia lines that apply; and its open alerts and those of the last 30 days.
 * Null when the zone is gone. */
export async function zonePageView(who: Pick<Who, "farmId">, zoneId: string) {
  const view = await getZoneView(zoneId);
  if (!view) return null;
  const { bin } = view;
  const profile = getSpecies(bin.species);
  const rules = profile ? resolveRules(profile, await binOverrides(who.farmId, bin.id)) : null;
  const ammoniaToo = view.metrics.includes("ammonia") || !!view.latest.ammonia;
  const metrics: ("temperature" | "moisture" | "ammonia")[] = ["temperature", "moisture", ...(ammoniaToo ? (["ammonia"] as const) : [])];
  const since = new Date(Date.now() - ALERT_DAYS * 86_400_000);
  const [binRow, feedings, alerts, ...series] = await Promise.all([
    getBin(bin.id),
    listBinFeedings(bin.id, feedingListQuery.parse({})),
    listZoneAlerts(zoneId, { since }),
    ...metrics.map((metric) => getZoneSeries(zoneId, seriesQuery.parse({ metric }))),
  ]);
  return {
    ...view,
    timezone: timeZoneOrUtc(view.timezone),
    profile,
    ammonia: { headsUpAtPpm: rules?.ammonia.t.headsUpAtPpm ?? 10, actNowAtPpm: rules?.ammonia.t.actNowAtPpm ?? 25 },
    metrics,
    binZones: (binRow?.zones ?? []).map((z) => ({ id: z.id, kind: z.kind, name: z.name })),
    feedings,
    alerts,
    series: metrics.map((metric, i) => ({ metric, answer: series[i]! })),
  };
}
