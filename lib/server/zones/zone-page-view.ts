import { getBin } from "@/db/queries/bins";
import { listOpenZoneAlerts } from "@/db/queries/alerts";
import { getZoneView, listZoneAlerts } from "@/db/queries/zone-view";
import type { Who } from "@/lib/server/auth/authorize";
import { listBinFeedings } from "@/lib/server/logbook/list-feedings";
import { binOverrides } from "@/lib/server/rules/bin-overrides";
import { readZoneSeries } from "@/lib/server/replica/chart-reads";
import { resolveRules } from "@/lib/domain/rules";
import { latestValueOf, metricOfAlert } from "@/lib/domain/alert-metric";
import { getSpecies } from "@/lib/domain/species";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import { feedingListQuery } from "@/lib/domain/validation/logbook";
import { seriesQuery } from "@/lib/domain/validation/series";
import { moistureHeading, temperatureHeading } from "./zone-heading-view";

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
  const [binRow, feedings, alerts, open, ...series] = await Promise.all([
    getBin(bin.id),
    listBinFeedings(bin.id, feedingListQuery.parse({})),
    listZoneAlerts(zoneId, { since }),
    listOpenZoneAlerts(zoneId),
    ...metrics.map((metric) => readZoneSeries(zoneId, seriesQuery.parse({ metric }))),
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
    // Shown first on the page, above the values: the open alerts with the words they were raised with.
    openAlerts: open.map((o) => ({
      ...o.alert,
      claimedByName: o.claimedByName,
      raisedWords: o.raisedMessage ?? o.alert.message,
      latestValue: latestValueOf(o.alert),
      metric: metricOfAlert(o.alert.kind, o.alert.details),
    })),
    heading: {
      temperature: temperatureHeading(series[0], view.unitSystem),
      moisture: moistureHeading(series[1], profile, timeZoneOrUtc(view.timezone)),
    },
    series: metrics.map((metric, i) => ({ metric, answer: series[i]! })),
  };
}
