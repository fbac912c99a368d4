// One evaluation's view of a zone: each probe's series cleaned and tied to its probe, which
// feedings count, and the step that turns "what the readings call for" into a transition.
import type { Metric } from "@/lib/domain/vocabulary";
import type { AlertLevel, ResolvedRules, RuleKind, Thresholds } from "./params";
import { METRICS, type MetricKey } from "../metrics";
import { cleanSeries, holdsFor, type Sample } from "./series";
import type { FeedingContext, OpenAlert, ProbeContext, Transition, ZoneRuleInput } from "./types";
import type { Words } from "./words";

export const MINUTE = 60_000;
export const HOUR = 3_600_000;

/** How long a probe may send nothing before it is silent: so many missed reports, never sooner than
 * the rule's minimum. The silent-probe alert and the probe list's "silent since" both draw this line. */
export function silentLineMs(t: Pick<Thresholds<"silent_probe">, "missedReports" | "minSilentMinutes">, reportIntervalS: number): number {
  return Math.max(t.missedReports * reportIntervalS * 1000, t.minSilentMinutes * MINUTE);
}

export type ProbeView = {
  probeId: number;
  probe: ProbeContext | undefined;
  metric: Metric;
  /** Error codes and out-of-range values are left out here: they are probe_fault's business. */
  s: readonly Sample[];
  raw: readonly Sample[];
  /** The silent-probe line: a gap this long breaks a run, a series this old is stale. */
  gapMs: number;
  /** The probe's report interval: what one reading stands for. */
  stepMs: number;
};

// Common practice: a least-squares rate needs three points, and a settle three readings in a row,
// whatever the report interval (a slow probe's window and settle stretch to cover them).
export const WINDOW_REPORTS = 3;
export const SETTLE_REPORTS = 3;

/** A rule's window in minutes, stretched to hold WINDOW_REPORTS reports of this probe. */
export const windowMs = (view: Pick<ProbeView, "stepMs">, minutes: number) => Math.max(minutes * MINUTE, (WINDOW_REPORTS - 1) * view.stepMs + view.stepMs / 2);

export type RuleContext = {
  input: ZoneRuleInput;
  now: number;
  rules: ResolvedRules;
  w: Words;
  /** Series whose latest reading is newer than the silent-probe line, in probe-id order. */
  fresh: (metric: Metric) => ProbeView[];
  all: (metric: Metric) => ProbeView[];
  ofProbe: (probeId: number) => ProbeView[];
  silentAfterMs: (probe: ProbeContext | undefined) => number;
  /** The zone's latest feeding at or before t, if no older than watchMs. */
  feedingAt: (t: number, watchMs: number, withMix?: boolean) => FeedingContext | null;
  /** The zone's latest heavy feeding still watched at t (heat's post-feed watch). */
  heavyFeedingAt: (t: number) => HeavyFeeding | null;
};

/** A feeding that armed the heat watch: how heavy against the bed, and how long it is watched. */
export type HeavyFeeding = { feeding: FeedingContext; kgPerM2: number | null; times: number; watchMs: number };

/**
 * How many times the heavy line a feeding is: kg per m² of the bed it went on (the whole floor, or
 * the zone's share of it when fed to one zone), or kg alone for a bin with no size. A feeding of
 * unknown mass counts as exactly heavy: better a watch too many than a cooked bed.
 */
export function feedingLoad(f: FeedingContext, input: Pick<ZoneRuleInput, "bed">, t: Pick<Thresholds<"heat">, "heavyFeedKgPerM2" | "heavyFeedKg">) {
  const kg = f.totalKg;
  if (kg == null || !Number.isFinite(kg)) return { kgPerM2: null, times: 1 };
  const { lengthCm, widthCm, zoneCount } = input.bed ?? {};
  const floorM2 = lengthCm && widthCm && lengthCm > 0 && widthCm > 0 ? (lengthCm * widthCm) / 10_000 : null;
  if (floorM2 === null) return { kgPerM2: null, times: t.heavyFeedKg > 0 ? kg / t.heavyFeedKg : Number.POSITIVE_INFINITY };
  const share = f.zoneId != null && zoneCount && zoneCount > 1 ? floorM2 / zoneCount : floorM2;
  const kgPerM2 = kg / share;
  return { kgPerM2, times: t.heavyFeedKgPerM2 > 0 ? kgPerM2 / t.heavyFeedKgPerM2 : Number.POSITIVE_INFINITY };
}

export function makeContext(input: ZoneRuleInput, rules: ResolvedRules, w: Words): RuleContext {
  const { now } = input;
  const probes = new Map(input.probes.map((p) => [p.id, p]));
  const silentAfterMs = (p: ProbeContext | undefined) => silentLineMs(rules.silent_probe.t, p?.reportIntervalS ?? 60);

  // Each probe's series of one metric, cleaned once. A series that is the only one of its probe and
  // metric and comes clean (replay() cleans once for all its steps) is taken as it is: copying a
  // day's readings at every step was most of a replay's time.
  const grouped = new Map<string, { probeId: number; metric: Metric; parts: ZoneRuleInput["readings"][number][] }>();
  for (const r of input.readings) {
    const key = `${r.probeId}\u0000${r.metric}`;
    const g = grouped.get(key) ?? { probeId: r.probeId, metric: r.metric, parts: [] };
    g.parts.push(r);
    grouped.set(key, g);
  }
  const views: ProbeView[] = [...grouped.values()]
    .map((g) => {
      const probe = probes.get(g.probeId);
      const only = g.parts.length === 1 ? g.parts[0]! : null;
      const raw: readonly Sample[] = only?.clean ? only.points : cleanSeries(g.parts.flatMap((r) => r.points));
      const allGood = raw.every((p) => valueFault(g.metric, p.v) === null);
      const s = allGood ? raw : raw.filter((p) => valueFault(g.metric, p.v) === null);
      return {
        probeId: g.probeId,
        probe,
        metric: g.metric,
        s,
        raw,
        gapMs: silentAfterMs(probe),
        stepMs: (probe?.reportIntervalS ?? 60) * 1000,
      };
    })
    .filter((v) => v.raw.length > 0)
    .sort((a, b) => a.probeId - b.probeId);

  const mine = input.recentFeedings.filter((f) => Number.isFinite(f.at) && (f.zoneId == null || f.zoneId === input.zone.id)).sort((a, b) => b.at - a.at);
  // A light feeding arms nothing; a heavy one is watched feedingWatchHours, longer as it is heavier.
  const heat = rules.heat.t;
  const heavy: HeavyFeeding[] = mine.flatMap((feeding) => {
    const { kgPerM2, times } = feedingLoad(feeding, input, heat);
    if (!(times >= 1)) return [];
    const hours = Math.min(Math.max(heat.feedingWatchHours, heat.feedingWatchMaxHours), heat.feedingWatchHours * times);
    return [{ feeding, kgPerM2, times, watchMs: hours * HOUR }];
  });

  return {
    input,
    now,
    rules,
    w,
    all: (metric) => views.filter((v) => v.metric === metric),
    ofProbe: (probeId) => views.filter((v) => v.probeId === probeId).sort((a, b) => a.metric.localeCompare(b.metric)),
    fresh: (metric) => views.filter((v) => v.metric === metric && v.s.length > 0 && v.s[v.s.length - 1]!.t > now - v.gapMs),
    silentAfterMs,
    feedingAt: (t, watchMs, withMix = false) => {
      const f = mine.find((x) => x.at <= t && (!withMix || Number.isFinite(x.mixCn ?? Number.NaN)));
      return f && t - f.at <= watchMs ? f : null;
    },
    heavyFeedingAt: (t) => {
      for (const h of heavy) if (h.feeding.at <= t && t - h.feeding.at <= h.watchMs) return h;
      return null;
    },
  };
}

export type Trigger = { id: string; level: AlertLevel; holdMs: number; holds: (i: number) => boolean };

export type Judged = { view: ProbeView; held: Trigger | null; clear: boolean; i: number; last: Sample };

/**
 * Which trigger (listed worst first) has held for its duration, and whether the settle condition
 * has. A raise's hold is rounded down to whole report intervals, so a probe reporting every 40 min
 * or hourly raises on its first reading past a 10-min line, not an interval later; a settle needs
 * its minutes and SETTLE_REPORTS readings in a row, so one good reading of a slow probe never settles.
 */
export function judge(view: ProbeView, triggers: readonly Trigger[], clear: (i: number) => boolean, settleMs: number): Judged {
  const holdOf = (ms: number) => (view.stepMs > 0 ? ms - (ms % view.stepMs) : ms);
  const held = triggers.find((tr) => holdsFor(view.s, tr.holds, view.gapMs, holdOf(tr.holdMs))) ?? null;
  const i = view.s.length - 1;
  return { view, held, clear: holdsFor(view.s, clear, view.gapMs, settleMs, SETTLE_REPORTS), i, last: view.s[i]! };
}

const RANK: Record<AlertLevel, number> = { heads_up: 1, act_now: 2 };
export const rank = (l: AlertLevel | null | undefined) => (l ? RANK[l] : 0);

/** The probe to speak of: highest level, then the most extreme value, then the lowest id. */
export function worstOf(judged: readonly Judged[], extremity: (j: Judged) => number): Judged | null {
  let best: Judged | null = null;
  for (const j of judged) {
    if (!best || rank(j.held?.level) > rank(best.held?.level) || (rank(j.held?.level) === rank(best.held?.level) && extremity(j) > extremity(best))) {
      best = j;
    }
  }
  return best;
}

/** What the readings call for now, for one subject; null when there is nothing fresh to judge by. */
export type Verdict = {
  level: AlertLevel | null;
  clear: boolean;
  probeId: number | null;
  value: number | null;
  message: string;
  settleMessage: string;
  details: Record<string, unknown>;
};

export type Key = { subject: string; kind: RuleKind; zoneId: string; probeId: number | null };

/**
 * The transition from the open alert (if any) to what the readings call for. A level never drops
 * while the alert is open: it ends only by settling, after the settle condition has held.
 */
export function decide(key: Key, open: OpenAlert | undefined, v: Verdict | null): Transition | null {
  if (!v) return null;
  const base = { subject: key.subject, kind: key.kind, zoneId: key.zoneId, probeId: v.probeId ?? key.probeId, value: v.value, details: v.details };
  if (!open) return v.level ? { type: "raise", level: v.level, message: v.message, ...base } : null;
  if (v.clear) return { type: "settle", level: open.level, message: v.settleMessage, ...base };
  if (v.level === "act_now" && open.level === "heads_up") return { type: "escalate", level: "act_now", message: v.message, ...base };
  // An open alert keeps the words it was raised (or escalated) with, so a keeper reads what woke
  // them; the latest reading goes beside them in details. New words only when the farm changed units.
  const latestAt = (v.details.readingAt ?? v.details.lastSeenAt ?? null) as number | null;
  const sameUnits = (open.details?.unitSystem ?? null) === (v.details.unitSystem ?? null);
  const message = open.message !== undefined && sameUnits ? open.message : v.message;
  if (message === open.message && open.details?.latestAt === latestAt && open.value === v.value) return null;
  const details = { ...v.details, latestValue: v.value, latestAt };
  return { type: "update", level: open.level, message, ...base, details };
}

/** Why a stored value cannot be a reading of `metric` (lib/domain/metrics.ts); null when it can. */
export function valueFault(metric: MetricKey, v: number): "error-code" | "out-of-range" | null {
  const spec = METRICS[metric];
  if (spec.errorCodes.some((c) => Math.abs(v - c) < 1e-9)) return "error-code";
  if (spec.range && (v < spec.range.min || v > spec.range.max)) return "out-of-range";
  return null;
}
