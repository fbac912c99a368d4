// "What would this change have raised?" An owner's unsaved change to one alert kind of a bin,
// replayed with replay() (lib/domain/rules, the same code the live runner evaluates with) over the
// bin's last 30 days of stored readings and feedings, beside the rules as they are saved now.
//
// Step. The live runner evaluates a zone at each reading it stores; replaying every reading of a
// month is 43,200 evaluations per zone at 1-minute reports. The preview evaluates every
// PREVIEW_STEP_MINUTES instead (and at each feeding, and at the end of the window). What the coarser
// step can change, against the runner:
// - a raise, an escalation or a settle is seen up to one step late (its hold is checked at the
//   next step, over the readings up to then), so a span can start and end a few minutes later;
// - a trigger that holds for less than its hold plus one step can be missed: every reading is still
//   there, but no step may fall in the short stretch after the hold is met and before it stops (at
//   a 10-min step and the 10-min hold, a spell past a line is sure to count once it lasts 20 min).
//   The preview can therefore count slightly fewer alerts than the runner would have raised; both
//   columns (now and with the change) are counted the same way, so the comparison is fair.
// A feeding is a step of its own, so the post-feed watch starts where the runner's would.
//
// Cost (tests/bench/preview.bench.ts; a bin of 3 zones × 30 days of 1-min temperature and moisture,
// a feeding every third day, on 2 CPUs shared with other work): one zone's heat replay takes about
// 0.8–1.2 s at a 10-min step (2.3–3 s without lookbackSizing below, 8–13 s at every minute); a whole
// preview 6–11 s the first time in a step, about 5 s for the next edit, which replays only the change.
// A quarter of each evaluation is spent building a clock formatter for alert words the preview never
// shows (lib/domain/rules/words.ts), and most of the rest copying each step's slice of readings.
import { getPreviewBin, listPreviewHistory } from "@/db/queries/preview-inputs";
import { AppError } from "@/lib/domain/errors";
import {
  RULE_PARAMETERS,
  checkThresholds,
  lookback,
  overridesFromRuleRows,
  replay,
  resolveRules,
  type AlertLevel,
  type ReplayStep,
  type RuleKind,
  type RuleOverrides,
  type RuleRow,
} from "@/lib/domain/rules";
import { getSpecies } from "@/lib/domain/species";
import type { RulePreviewInput } from "@/lib/domain/validation/rules";
import type { Metric } from "@/lib/domain/vocabulary";
import { zoneName } from "@/lib/domain/zone-words";
import type { Who } from "@/lib/server/auth/authorize";
import { recentMemo } from "./preview-memo";
import { seriesByProbe, zoneReplayInput, type BinHistory } from "./replay-input";

export const PREVIEW_DAYS = 30;
/** Measured in tests/bench/preview.bench.ts; see the top of this file for what it can change and cost. */
export const PREVIEW_STEP_MINUTES = 10;

const MINUTE = 60_000;
const HOUR = 3_600_000;
const DAY = 86_400_000;

export type LevelCounts = { heads_up: number; act_now: number };
/** One would-be alert: from its raise to its settle (null: still open when the window ends). Times in epoch ms. */
export type PreviewSpan = { subject: string; level: AlertLevel; from: number; to: number | null; escalatedAt: number | null };

/** The metric a kind's chart draws: the one its lines are drawn on (probe kinds show temperature). */
export const PREVIEW_METRIC: Record<RuleKind, Metric> = {
  heat: "temperature",
  chill: "temperature",
  drying: "moisture",
  soggy: "moisture",
  ammonia: "ammonia",
  silent_probe: "temperature",
  probe_fault: "temperature",
};

/** The heads-up and act-now lines of a kind, where it has them on the chart's metric. */
const LINE_KEYS: Partial<Record<RuleKind, [string, string]>> = {
  heat: ["headsUpAboveC", "actNowAtC"],
  chill: ["headsUpBelowC", "actNowBelowC"],
  drying: ["headsUpBelowPct", "actNowBelowPct"],
  soggy: ["headsUpAbovePct", "actNowAbovePct"],
  ammonia: ["headsUpAtPpm", "actNowAtPpm"],
};

/** Every `stepMs` on a grid from `from` to `to`, each feeding time in between, and `to` itself. */
export function previewTimes(from: number, to: number, stepMs: number, extra: readonly number[] = []): number[] {
  const out = new Set<number>();
  for (let t = Math.ceil(from / stepMs) * stepMs; t <= to; t += stepMs) out.add(t);
  for (const t of extra) if (t >= from && t <= to) out.add(t);
  out.add(to);
  return [...out].sort((a, b) => a - b);
}

/** The alerts a replay raised, each from raise to settle, at the highest level it reached. */
export function alertSpans(steps: readonly ReplayStep[]): PreviewSpan[] {
  const open = new Map<string, PreviewSpan>();
  const done: PreviewSpan[] = [];
  for (const step of steps) {
    for (const t of step.transitions) {
      const span = open.get(t.subject);
      if (t.type === "raise" && !span) open.set(t.subject, { subject: t.subject, level: t.level, from: step.at, to: null, escalatedAt: null });
      else if (t.type === "escalate" && span) {
        span.level = t.level;
        span.escalatedAt ??= step.at;
      } else if (t.type === "settle" && span) {
        span.to = step.at;
        done.push(span);
        open.delete(t.subject);
      }
    }
  }
  return [...done, ...open.values()].sort((a, b) => a.from - b.from);
}

/** Alerts per level: one that grew from heads-up to act now counts once, as act now. */
export function countLevels(spans: readonly PreviewSpan[]): LevelCounts {
  const out: LevelCounts = { heads_up: 0, act_now: 0 };
  for (const s of spans) out[s.level] += 1;
  return out;
}

const add = (a: LevelCounts, b: LevelCounts): LevelCounts => ({ heads_up: a.heads_up + b.heads_up, act_now: a.act_now + b.act_now });

/** Hourly means of a zone's probes for one metric over [from, to]: t in epoch ms (start of the hour). */
function hourlyLine(series: readonly { metric: Metric; points: readonly { t: number; v: number }[] }[], metric: Metric, from: number, to: number) {
  const sums = new Map<number, { sum: number; n: number }>();
  for (const s of series) {
    if (s.metric !== metric) continue;
    for (const p of s.points) {
      if (p.t < from || p.t > to || !Number.isFinite(p.v)) continue;
      const hour = Math.floor(p.t / HOUR) * HOUR;
      const b = sums.get(hour) ?? { sum: 0, n: 0 };
      b.sum += p.v;
      b.n += 1;
      sums.set(hour, b);
    }
  }
  const hours = [...sums.keys()].sort((a, b) => a - b);
  return { t: hours, v: hours.map((h) => sums.get(h)!.sum / sums.get(h)!.n) };
}

/** The overrides the bin would have once this change is saved: PUT replaces the bin's row of the kind. */
export function proposedOverrides(
  rows: readonly RuleRow[],
  binId: string,
  change: { kind: RuleKind; enabled: boolean; thresholds: Record<string, number> },
): RuleOverrides {
  const others = rows.filter((r) => !(r.binId === binId && r.kind === change.kind));
  return overridesFromRuleRows([...others, { binId, kind: change.kind, enabled: change.enabled, thresholds: change.thresholds }], binId);
}

/**
 * Overrides that size replay()'s lookback for `kind` alone: the kind's own values, and every other
 * kind's durations at 0. replay() loads, at each step, as much history as lookback() says the
 * slowest rule needs (the drying trend's 24 h); the preview evaluates one kind, so the other kinds'
 * windows only cost time (three times as much per step for heat, tests/bench/preview.bench.ts). The rules evaluated are the
 * real ones, passed as `rules`; the silent-probe line is left alone, since every kind reads it.
 */
export function lookbackSizing(kind: RuleKind, overrides: RuleOverrides): RuleOverrides {
  const out: RuleOverrides = {};
  for (const k of Object.keys(RULE_PARAMETERS) as RuleKind[]) {
    if (k === kind || k === "silent_probe") {
      if (overrides[k]) out[k] = overrides[k];
      continue;
    }
    const durations = RULE_PARAMETERS[k].filter((p) => p.unit === "min" || p.unit === "h").map((p) => [p.key, 0] as const);
    out[k] = { enabled: overrides[k]?.enabled, thresholds: Object.fromEntries(durations) };
  }
  return out;
}

// A month of one bin's readings takes about a second to read; two bins are kept. Replays are kept
// per zone, kind and rules, so the saved rules' column is replayed once per window.
const histories = recentMemo<Promise<Awaited<ReturnType<typeof listPreviewHistory>> & { series: ReturnType<typeof seriesByProbe> }>>(2);
const replays = recentMemo<PreviewSpan[]>(64);

/** The preview of one kind's unsaved change for a bin of the caller's farm. */
export async function previewBinRule(who: Pick<Who, "farmId">, binId: string, input: RulePreviewInput, at = new Date()) {
  const checked = checkThresholds(input.kind, input.thresholds);
  if (!checked.ok) throw new AppError("invalid", checked.error.message, checked.error.field);
  const place = await getPreviewBin(who.farmId, binId);
  const species = place && getSpecies(place.bin.species);
  if (!place || !species) throw new AppError("not_found", "Not found.");

  // The window ends on a step boundary, so a few edits in a row share their history and the saved
  // rules' replay (preview-memo.ts); readings of the last few minutes join at the next step.
  const stepMs = PREVIEW_STEP_MINUTES * MINUTE;
  const to = Math.floor(at.getTime() / stepMs) * stepMs;
  const from = to - PREVIEW_DAYS * DAY;
  const rows = place.rules as RuleRow[];
  const current = overridesFromRuleRows(rows, binId);
  const proposed = proposedOverrides(rows, binId, { kind: input.kind, enabled: input.enabled, thresholds: checked.value });
  // Enough history before the window that its first step sees every duration it needs.
  const reach = [current, proposed].map((o) => lookback(resolveRules(species, o)));
  const probeIds = place.probes.map((p) => p.id);
  const readingsFrom = from - Math.max(...reach.map((r) => r.readingsMs));
  const feedingsFrom = from - Math.max(...reach.map((r) => r.feedingsMs));
  const history = await histories(`${binId}|${probeIds.join(",")}|${readingsFrom}|${feedingsFrom}|${to}`, async () => {
    const rows = await listPreviewHistory(binId, probeIds, new Date(readingsFrom), new Date(to), new Date(feedingsFrom));
    return { ...rows, series: seriesByProbe(rows.readings) };
  });
  const h: BinHistory = {
    binName: place.bin.name,
    species,
    unitSystem: place.farm.unitSystem,
    timeZone: place.farm.timezone,
    bed: { lengthCm: place.bin.lengthCm, widthCm: place.bin.widthCm, zoneCount: place.zones.length },
    probes: place.probes,
    readings: history.readings,
    feedings: history.feedings,
    refusals: history.refusals,
  };
  const series = history.series;
  const times = previewTimes(
    from,
    to,
    stepMs,
    history.feedings.map((f) => f.at.getTime()),
  );
  const lines = LINE_KEYS[input.kind];
  const t = resolveRules(species, proposed)[input.kind].t as Record<string, number>;

  const zones = place.zones.map((zone) => {
    const zoneProbes = place.probes.filter((p) => p.zoneId === zone.id);
    const run = (o: RuleOverrides) =>
      replays(
        `${zone.id}|${zoneProbes.map((p) => `${p.id}:${p.reportIntervalS}`).join(",")}|${species.id}|${place.farm.timezone}|${place.bin.lengthCm}x${place.bin.widthCm}/${place.zones.length}|${input.kind}|${to}|${JSON.stringify(o)}`,
        () => alertSpans(replay({ ...zoneReplayInput(zone, h, series, lookbackSizing(input.kind, o), [input.kind]), rules: resolveRules(species, o) }, times)),
      );
    const nowSpans = run(current);
    const spans = run(proposed);
    const zoneSeries = zoneProbes.flatMap((p) => series.get(p.id) ?? []);
    const hasAmmonia = zoneSeries.some((s) => s.metric === "ammonia" && s.points.some((p) => p.t >= from));
    const metric = input.kind === "ammonia" && !hasAmmonia ? "temperature" : PREVIEW_METRIC[input.kind];
    const line = hourlyLine(zoneSeries, metric, from, to);
    return {
      id: zone.id,
      name: zoneName(zone),
      metric,
      now: countLevels(nowSpans),
      proposed: countLevels(spans),
      nowSpans,
      spans,
      line,
      lines: lines && metric === PREVIEW_METRIC[input.kind] ? { headsUp: t[lines[0]] ?? null, actNow: t[lines[1]] ?? null } : null,
    };
  });

  return {
    kind: input.kind,
    from,
    to,
    days: PREVIEW_DAYS,
    stepMinutes: PREVIEW_STEP_MINUTES,
    hasReadings: history.readings.some((r) => r.t.some((t) => t >= from)),
    now: zones.reduce((s, z) => add(s, z.now), { heads_up: 0, act_now: 0 }),
    proposed: zones.reduce((s, z) => add(s, z.proposed), { heads_up: 0, act_now: 0 }),
    zones,
  };
}

export type RulePreview = Awaited<ReturnType<typeof previewBinRule>>;
