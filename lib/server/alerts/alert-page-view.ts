import { getAlertWithPlace, listAlertEvents } from "@/db/queries/alerts";
import { getFarm } from "@/db/queries/farms";
import { getBin } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { listBinFeedings } from "@/lib/server/logbook/list-feedings";
import { binOverrides } from "@/lib/server/rules/bin-overrides";
import { readZoneSeries } from "@/lib/server/replica/chart-reads";
import { resolveRules } from "@/lib/domain/rules";
import { getSpecies } from "@/lib/domain/species";
import { latestValueOf, metricOfAlert } from "@/lib/domain/alert-metric";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import { feedingListQuery } from "@/lib/domain/validation/logbook";
import { seriesQuery } from "@/lib/domain/validation/series";
import { moistureHeading, temperatureHeading } from "@/lib/server/zones/zone-heading-view";

/** The chart starts this long before the alert was raised, to show what led to it (common practice). */
export const BEFORE_MS = 6 * 3_600_000;
/** …and runs this long past its settling, to show that it held. */
export const AFTER_MS = 1 * 3_600_000;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** "12 min", "2 h 5 min", "3 days 4 h" */
export function durationWords(ms: number): string {
  const min = Math.max(0, Math.round(ms / 60_000));
  if (min < 1) return "under a minute";
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  if (h < 48) return min % 60 ? `${h} h ${min % 60} min` : `${h} h`;
  const d = Math.floor(h / 24);
  return h % 24 ? `${d} days ${h % 24} h` : `${d} days`;
}

type Event = Awaited<ReturnType<typeof listAlertEvents>>[number];

const CHANNEL_WORDS: Record<string, string> = { push: "pushed to", email: "e-mailed" };

/** One event of an alert in plain words: what happened and to or by whom. */
export function eventWords(e: Event): string {
  const who = e.userName ?? "someone";
  const d = e.detail;
  switch (e.type) {
    case "raised":
      return "Raised";
    case "escalated":
      return "Became act now";
    case "sent":
      return `${d.reason === "reminder" ? "Reminder " : ""}${CHANNEL_WORDS[e.channel ?? ""] ?? "sent to"} ${who}`.replace(/^./, (c) => c.toUpperCase());
    case "send_failed":
      return `${e.channel === "email" ? "E-mail" : "Push"} to ${who} did not get through${typeof d.why === "string" ? `: ${d.why}` : ""}`;
    case "held":
      return `Held back for ${who}'s quiet hours`;
    case "released":
      // The same word serves two things: a claim handed back, and a push held by quiet hours let go.
      return d.claim ? `${who} released the claim` : `Sent to ${who} after quiet hours`;
    case "claimed":
      return `Claimed by ${who}`;
    case "settled":
      if (!e.userId && !d.note) return "Settled: the readings came back";
      return `Settled by ${who}${typeof d.note === "string" && d.note ? `, with a note: “${d.note}”` : ""}`;
    default:
      return e.type;
  }
}

/** What an alert's own page shows: its words and where it is, the chart around it (a few hours
 * before it was raised to its settling or now, the species' band, the bin's feedings), each event
 * in words with how long after the raise it came, and the settle note. Null when the alert is not
 * this farm's: the page then answers not found, as for an alert that does not exist. */
export async function alertPageView(who: Pick<Who, "farmId">, alertId: string) {
  if (!UUID.test(alertId)) return null;
  const row = await getAlertWithPlace(alertId);
  if (!row || row.alert.farmId !== who.farmId) return null;
  const { alert } = row;
  const profile = getSpecies(row.species);
  const [farm, bin, overrides, events] = await Promise.all([
    getFarm(who.farmId),
    getBin(alert.binId),
    binOverrides(who.farmId, alert.binId),
    listAlertEvents(alertId),
  ]);
  const rules = profile ? resolveRules(profile, overrides) : null;
  const metric = metricOfAlert(alert.kind, alert.details);
  const now = Date.now();
  const raised = alert.raisedAt.getTime();
  const from = new Date(raised - BEFORE_MS);
  const to = alert.settledAt ? new Date(Math.min(now, alert.settledAt.getTime() + AFTER_MS)) : null;
  const [series, feedings] = await Promise.all([
    alert.zoneId ? readZoneSeries(alert.zoneId, seriesQuery.parse({ metric, from: from.toISOString(), ...(to ? { to: to.toISOString() } : {}) })) : null,
    listBinFeedings(alert.binId, feedingListQuery.parse({ since: from.toISOString(), limit: 100 })),
  ]);

  const raisedEvent = events.find((e) => e.type === "raised");
  const settledEvent = events.findLast((e) => e.type === "settled");
  const steps = events.map((e) => ({ id: e.id, type: e.type, at: e.at, words: eventWords(e), after: durationWords(e.at.getTime() - raised) }));
  if (alert.remindedAt && !events.some((e) => e.type === "sent" && e.detail.reason === "reminder")) {
    const at = alert.remindedAt;
    steps.push({ id: -1, type: "reminded", at, words: "Reminder sent: still unclaimed", after: durationWords(at.getTime() - raised) });
    steps.sort((x, y) => x.at.getTime() - y.at.getTime());
  }
  const note = settledEvent && typeof settledEvent.detail.note === "string" ? settledEvent.detail.note : null;
  const timezone = timeZoneOrUtc(farm?.timezone ?? "UTC");
  const unitSystem = farm?.unitSystem ?? "metric";
  // While it is open: where the reading is heading now, from the same trend code as the rules.
  const heading =
    alert.state === "settled" || !series
      ? null
      : metric === "temperature"
        ? temperatureHeading(series, unitSystem).words
        : metric === "moisture"
          ? moistureHeading(series, profile, timezone).words
          : null;
  return {
    alert,
    heading,
    // The words it was raised with; the row's message may have been reworded by later readings.
    raisedWords: typeof raisedEvent?.detail.message === "string" ? raisedEvent.detail.message : alert.message,
    latestValue: latestValueOf(alert),
    binName: row.binName,
    zone: alert.zoneId && row.zoneKind ? { id: alert.zoneId, kind: row.zoneKind, name: row.zoneName } : null,
    claimedByName: row.claimedByName,
    species: row.species,
    profile,
    unitSystem,
    timezone,
    ammonia: { headsUpAtPpm: rules?.ammonia.t.headsUpAtPpm ?? 10, actNowAtPpm: rules?.ammonia.t.actNowAtPpm ?? 25 },
    metric,
    window: { from: from.toISOString(), to: to?.toISOString() ?? null },
    series,
    feedings,
    binZones: (bin?.zones ?? []).map((z) => ({ id: z.id, kind: z.kind, name: z.name })),
    steps,
    note,
    settledBy: settledEvent ? (settledEvent.userId ? (settledEvent.userName ?? "someone") : null) : null,
  };
}
export type AlertPageView = NonNullable<Awaited<ReturnType<typeof alertPageView>>>;
