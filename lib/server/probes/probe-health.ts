import { getFarm } from "@/db/queries/farms";
import { getProbeHealthRow, listLatestProbeReadings, listProbeRefusals } from "@/db/queries/probes-health";
import { listFarmRules } from "@/db/queries/rules";
import { probePresence, silentRuleFor } from "@/lib/domain/probe-presence";
import { refusalWords, visibleExcerpt } from "@/lib/domain/refusal-words";
import { AppError } from "@/lib/domain/errors";
import type { Who } from "@/lib/server/auth/authorize";

/** How many refused messages the probe's page lists. */
export const REFUSALS_SHOWN = 10;

/**
 * One probe's health for its page: whether it is reporting (its last report over MQTT or HTTP
 * against its report interval, on the silent-probe rule's line), its latest values, and its
 * latest refused messages in plain words with the first bytes received.
 */
export async function probeHealth(who: Pick<Who, "farmId">, probeId: number, now = new Date()) {
  const probe = await getProbeHealthRow(who.farmId, probeId);
  if (!probe) throw new AppError("not_found", "Not found.");
  const [latest, refusals, rules, farm] = await Promise.all([
    listLatestProbeReadings(probe.id),
    listProbeRefusals(probe.id, REFUSALS_SHOWN),
    listFarmRules(who.farmId, "silent_probe"),
    getFarm(who.farmId),
  ]);
  const lastReadingAt = latest.reduce<Date | null>((m, r) => (m === null || r.ts > m ? r.ts : m), null);
  const rule = silentRuleFor(rules, probe.binId && probe.binSpecies ? { id: probe.binId, species: probe.binSpecies } : null);
  return {
    /** When this was judged: "2 min ago" is said from here. */
    at: now,
    timeZone: farm?.timezone ?? "UTC",
    probe: {
      id: probe.id,
      code: probe.code,
      label: probe.label,
      reportIntervalS: probe.reportIntervalS,
      connected: probe.connected,
      archivedAt: probe.archivedAt,
    },
    presence: probePresence({ lastReadingAt, lastHeardAt: probe.lastSeenAt, reportIntervalS: probe.reportIntervalS }, rule, now),
    latest,
    refusals: refusals.map((r) => ({
      id: r.id,
      receivedAt: r.receivedAt,
      source: r.source,
      topic: r.topic,
      records: r.records,
      ...refusalWords(r.reason),
      excerpt: visibleExcerpt(r.excerpt),
    })),
  };
}
