// One zone's rule input for replay(), built from database rows the way the live runner builds its
// ZoneRuleInput (lib/server/alerts/evaluate-zone.ts): each probe's readings grouped per metric, the
// bin's feedings, the zone's probes with their refusals. The preview replays exactly this.
import type { BedContext, ReplayInput, RuleOverrides } from "@/lib/domain/rules";
import type { SpeciesProfile } from "@/lib/domain/species";
import type { UnitSystem } from "@/lib/domain/units";
import type { Metric, ZoneKind } from "@/lib/domain/vocabulary";

type ZoneRow = { id: string; kind: ZoneKind; name: string | null };
type ProbeRow = { id: number; zoneId: string | null; code: string; label: string | null; reportIntervalS: number; lastSeenAt: Date | null; metrics: string[] };
type FeedingRow = { at: Date; zoneId: string | null; mixMoisturePct: number | null; mixCn: number | null; totalKg: number | null };
type RefusalRow = { probeId: number | null; at: Date; reason: string };
/** One probe's series of one metric: times (epoch ms) and values, oldest first. */
type SeriesRow = { probeId: number; metric: string; t: readonly number[]; v: readonly number[] };

export type BinHistory = {
  binName: string;
  species: SpeciesProfile;
  unitSystem: UnitSystem;
  timeZone: string;
  /** The bin's floor and how many zones share it: how heavy a feeding is (as the live runner reads it). */
  bed: BedContext;
  probes: readonly ProbeRow[];
  readings: readonly SeriesRow[];
  feedings: readonly FeedingRow[];
  refusals: readonly RefusalRow[];
};

/** Database feedings as the rules read them; the live runner and the preview share this. */
export const feedingContexts = (feedings: readonly FeedingRow[]) =>
  feedings.map((f) => ({ at: f.at.getTime(), zoneId: f.zoneId, mixMoisturePct: f.mixMoisturePct, mixCn: f.mixCn, totalKg: f.totalKg }));

/** Database probes with their refusals as the rules read them; the live runner and the preview share this. */
export const probeContexts = (probes: readonly Omit<ProbeRow, "zoneId">[], refusals: readonly RefusalRow[]) =>
  probes.map((p) => ({
    id: p.id,
    code: p.code,
    label: p.label,
    reportIntervalS: p.reportIntervalS,
    lastSeenAt: p.lastSeenAt?.getTime() ?? null,
    metrics: p.metrics,
    refusals: refusals.filter((r) => r.probeId === p.id).map((r) => ({ at: r.at.getTime(), reason: r.reason })),
  }));

/** Each probe's series per metric, keyed by probe id. */
export function seriesByProbe(readings: readonly SeriesRow[]) {
  const out = new Map<number, { probeId: number; metric: Metric; points: { t: number; v: number }[] }[]>();
  for (const r of readings) {
    const list = out.get(r.probeId) ?? [];
    list.push({ probeId: r.probeId, metric: r.metric as Metric, points: r.t.map((t, i) => ({ t, v: r.v[i]! })) });
    out.set(r.probeId, list);
  }
  return out;
}

/** The replay input of one zone of the bin, with the given overrides. */
export function zoneReplayInput(
  zone: ZoneRow,
  h: BinHistory,
  series: ReturnType<typeof seriesByProbe>,
  overrides: RuleOverrides,
  kinds?: ReplayInput["kinds"],
): ReplayInput {
  const zoneProbes = h.probes.filter((p) => p.zoneId === zone.id);
  return {
    zone: { id: zone.id, kind: zone.kind, binName: h.binName, zoneName: zone.name },
    species: h.species,
    bed: h.bed,
    overrides,
    readings: zoneProbes.flatMap((p) => series.get(p.id) ?? []),
    recentFeedings: feedingContexts(h.feedings),
    probes: probeContexts(zoneProbes, h.refusals),
    kinds,
    unitSystem: h.unitSystem,
    timeZone: h.timeZone,
  };
}
