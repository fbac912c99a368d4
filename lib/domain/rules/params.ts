// The numbers every alert rule runs on: defaults per kind (most from the species profile), what an
// owner may override per farm or per bin, and the resolved table the rules read. Each parameter names
// its source; "common practice" = a keeper's rule of thumb with no published source, "from memory" =
// a figure recalled but not verified; V = read in the published source itself.
import { fail, ok, type Result } from "../result";
import { ALERT_KINDS, ALERT_LEVELS, type AlertKind, type AlertLevel } from "../vocabulary";
import type { SpeciesProfile } from "../species";
import { NITROGEN_RICH_CN, WORM_BED_TARGET } from "../mix";

export { ALERT_KINDS, ALERT_LEVELS, type AlertLevel };
export type RuleKind = AlertKind;

export type ParamUnit = "°C" | "°C/h" | "%" | "% points" | "ppm" | "C:N" | "min" | "h" | "reports" | "count" | "days" | "kg" | "kg/m²";

export type ParamSpec = {
  key: string;
  label: string;
  unit: ParamUnit;
  /** Where the default comes from, in words a settings screen can show. */
  source: string;
  value: (species: SpeciesProfile) => number;
};

const COMMON = "common practice";
const fixed = (n: number) => () => n;
const mid = (a: number, b: number) => (a + b) / 2;

const param = <K extends string>(key: K, label: string, unit: ParamUnit, source: string, value: (s: SpeciesProfile) => number) =>
  ({ key, label, unit, source, value }) as const;

/** A parameter with no published source: a keeper's rule of thumb, fixed for every species. */
const common = <K extends string>(key: K, label: string, unit: ParamUnit, n: number) => param(key, label, unit, COMMON, fixed(n));

const raise = (n: number) => param("raiseMinutes", "Held this long before raising", "min", COMMON, fixed(n));
const settle = (n: number) => param("settleMinutes", "Held back inside the band before settling", "min", COMMON, fixed(n));
/** A moisture act-now line half-way between the comfortable band and the species' survival limit. */
const halfwayToLimit = <K extends string>(key: K, label: string, ends: (m: SpeciesProfile["moisturePct"]) => [number, number]) =>
  param(key, label, "%", `${COMMON}: half-way from the band to the species' survival limit`, (s) => mid(...ends(s.moisturePct)));
/** A band rule's lines: heads-up, act now, held 10 min before raising and 15 min inside the band
 * (past the deadband) before settling (common practice). */
const bandLines = <H, A, D>(headsUp: H, actNow: A, deadband: D) => [headsUp, actNow, raise(10), settle(15), deadband] as const;

/** How the drying rule reads a day's trend: a least-squares line over a window, trusted once the
 * readings span long enough, raising when it crosses the band soon and settling when the crossing
 * moves further off (all common practice). */
const DRYING_TREND = [
  common("trendWindowHours", "Drying trend fitted (least squares) over the last", "h", 24),
  common("trendMinSpanHours", "Trend needs readings spanning at least", "h", 6),
  common("trendHorizonHours", "Heads-up when the trend crosses the band within", "h", 12),
  common("trendSettleHorizonHours", "Trend settles once a crossing is further off than", "h", 18),
] as const;

export const RULE_PARAMETERS = {
  heat: [
    ...bandLines(
      param("headsUpAboveC", "Heads-up above", "°C", "species: top of the comfortable band", (s) => s.temperatureC.comfortHigh),
      param("actNowAtC", "Act now at or above", "°C", "species: warm stress (growth falls off)", (s) => s.temperatureC.warmStress),
      common("deadbandC", "Must fall this far below the heads-up line to settle", "°C", 0.5),
    ),
    common("riseRateCPerHour", "After a heavy feeding, heads-up on a rise faster than the zone's usual by", "°C/h", 1),
    common("riseWindowMinutes", "Rise measured (least squares) over the last", "min", 60),
    common("riseDeadbandCPerHour", "Rise must slow this far below the limit to settle", "°C/h", 0.5),
    // The zone's own daily rhythm: an outdoor bed warms every morning; that is not a feeding heating.
    common("rhythmDays", "Rise compared with the same hour on the previous", "days", 3),
    // Fresh feed can self-heat and kill the worms (Wikipedia "Vermicompost", "Climate and temperature", V);
    // how much food makes a feeding heavy, and how long to watch, have no published figure.
    common("heavyFeedKgPerM2", "A feeding is heavy from this much food per area of bed floor", "kg/m²", 4),
    common("heavyFeedKg", "… or, for a bin with no size, from this much food", "kg", 2),
    common("feedingWatchHours", "Watch a zone for a fast rise this long after a heavy feeding", "h", 48),
    common("feedingWatchMaxHours", "… longer for heavier feedings, up to", "h", 96),
  ],
  chill: [
    ...bandLines(
      param("headsUpBelowC", "Heads-up below", "°C", "species: bottom of the comfortable band", (s) => s.temperatureC.comfortLow),
      param(
        "actNowBelowC",
        "Act now below",
        "°C",
        "species: 2 °C above the cold survival line (the margin is common practice)",
        (s) => s.temperatureC.lethalCold + 2,
      ),
      common("deadbandC", "Must rise this far above the heads-up line to settle", "°C", 0.5),
    ),
  ],
  drying: [
    ...bandLines(
      param("headsUpBelowPct", "Heads-up below", "%", "species: bottom of the comfortable moisture band", (s) => s.moisturePct.comfortLow),
      halfwayToLimit("actNowBelowPct", "Act now below", (m) => [m.lethalDry, m.comfortLow]),
      common("deadbandPct", "Must rise this far above the heads-up line to settle", "% points", 2),
    ),
    ...DRYING_TREND,
  ],
  soggy: [
    ...bandLines(
      param("headsUpAbovePct", "Heads-up above", "%", "species: top of the comfortable moisture band", (s) => s.moisturePct.comfortHigh),
      param("actNowAbovePct", "Act now above", "%", "species: the wet survival line", (s) => s.moisturePct.lethalWet),
      common("deadbandPct", "Must fall this far below the heads-up line to settle", "% points", 2),
    ),
  ],
  ammonia: [
    // No verified worm threshold exists: the "0.5 mg/g" figure is unverified and is a concentration in
    // the bedding, not in air (attributed to Edwards 1988, not found), so these ppm lines are our own.
    ...bandLines(
      param("headsUpAtPpm", "Heads-up at or above", "ppm", `${COMMON} (no verified figure for worms)`, fixed(10)),
      param(
        "actNowAtPpm",
        "Act now at or above",
        "ppm",
        "from memory: NIOSH REL for people, 25 ppm (NIOSH Pocket Guide to Chemical Hazards, ammonia; not verified)",
        fixed(25),
      ),
      common("deadbandPpm", "Must fall this far below the heads-up line to settle", "ppm", 2),
    ),
    // One line with the mix check (lib/domain/mix.ts NITROGEN_RICH_CN): Rynk et al. NRAES-54 Table 2.1,
    // preferred C:N 25–30 (V-2nd); Cornell "Compost Chemistry" (V): below ~30:1 nitrogen leaves as ammonia.
    param(
      "riskCnBelow",
      "No ammonia probe: risk when the last feeding's C:N is below",
      "C:N",
      "Rynk et al., On-Farm Composting Handbook, Table 2.1: low end of the preferred 25–30; Cornell: below ~30:1 nitrogen leaves as ammonia",
      fixed(NITROGEN_RICH_CN),
    ),
    // The mix check's own wet line, so the two never disagree about one feeding.
    param(
      "riskWetAbovePct",
      "… and its mix moisture is above",
      "%",
      "Kaplan et al. 1980: most weight gain at 70–85 % moisture (the mix check's wet line)",
      fixed(WORM_BED_TARGET.moisturePct.high),
    ),
    common("riskWetHours", "A wet mix counts this long after the feeding, while the zone is not cooling", "h", 24),
    common("riskWarmingCPerHour", "… or the zone warms faster than", "°C/h", 0.5),
    common("riskWarmingDeadbandCPerHour", "Warming must slow this far below that to settle", "°C/h", 0.25),
    common("riskWindowMinutes", "Warming measured over the last", "min", 60),
    common("riskWatchHours", "A feeding counts for this long", "h", 72),
  ],
  silent_probe: [
    common("missedReports", "Silent after this many missed reports", "reports", 3),
    common("minSilentMinutes", "… and never sooner than", "min", 10),
    // Settling needs an hour of on-time reports (none later than the silent line), so a probe that
    // keeps dropping a few reports raises once for the whole spell, not at every gap.
    common("settleMinutes", "Reporting on time this long before settling", "min", 60),
  ],
  probe_fault: [
    raise(5),
    settle(15),
    common("stuckHours", "Stuck when a value does not change for", "h", 6),
    // A probe coarser than the steps below (whole percent, say) reads a steady bed unchanged for
    // hours: its stuck line stretches with its own step, up to this.
    common("stuckMaxHours", "… longer for a coarse probe, up to", "h", 48),
    // A 12-bit digital probe (DS18B20 style) reads in 1/16 °C steps: from memory.
    param("temperatureStepC", "Temperature sensor step", "°C", "from memory: 12-bit digital probe", fixed(0.0625)),
    common("moistureStepPct", "Moisture step", "%", 0.1),
    common("rawStepCounts", "Raw moisture step", "count", 1),
  ],
} as const satisfies Record<RuleKind, readonly ParamSpec[]>;

type Specs = typeof RULE_PARAMETERS;
export type ParamKey<K extends RuleKind> = Specs[K][number]["key"];
export type Thresholds<K extends RuleKind> = { [P in ParamKey<K>]: number };
export type ResolvedRule<K extends RuleKind> = { enabled: boolean; t: Thresholds<K> };
export type ResolvedRules = { [K in RuleKind]: ResolvedRule<K> };

/** What an owner changed for one kind: any numeric default, or the whole kind off. */
export type RuleOverride = { enabled?: boolean; thresholds?: Record<string, number> };
export type RuleOverrides = Partial<Record<RuleKind, RuleOverride>>;

function defaultsFor<K extends RuleKind>(kind: K, species: SpeciesProfile): Thresholds<K> {
  const out: Record<string, number> = {};
  for (const p of RULE_PARAMETERS[kind]) out[p.key] = p.value(species);
  return out as Thresholds<K>;
}

/** The defaults for one species, as a settings screen shows them. */
export function defaultRuleTable(species: SpeciesProfile) {
  return ALERT_KINDS.map((kind) => ({
    kind,
    enabled: true,
    params: RULE_PARAMETERS[kind].map((p) => ({ key: p.key, label: p.label, unit: p.unit, source: p.source, value: p.value(species) })),
  }));
}

// Durations, steps and deadbands below zero would turn the hysteresis inside out.
const mustNotBeNegative = (p: ParamSpec) => ["min", "h", "reports", "count", "days", "kg", "kg/m²"].includes(p.unit) || /Step|[dD]eadband/.test(p.key);

/** An override checked against the table: known keys, finite numbers, no negative durations or steps. */
export function checkThresholds(kind: RuleKind, thresholds: Record<string, unknown>): Result<Record<string, number>> {
  const specs: readonly ParamSpec[] = RULE_PARAMETERS[kind];
  const out: Record<string, number> = {};
  for (const [key, value] of Object.entries(thresholds)) {
    const spec = specs.find((p) => p.key === key);
    if (!spec) return fail(`thresholds.${key}`, `The ${kind.replace("_", " ")} rule has no setting "${key}".`);
    if (typeof value !== "number" || !Number.isFinite(value)) return fail(`thresholds.${key}`, `${spec.label} must be a number.`);
    if (mustNotBeNegative(spec) && value < 0) {
      return fail(`thresholds.${key}`, `${spec.label} cannot be negative.`);
    }
    out[key] = value;
  }
  return ok(out);
}

/** Species defaults with the owner's overrides laid over them; unusable override values are ignored. */
export function resolveRules(species: SpeciesProfile, overrides: RuleOverrides = {}): ResolvedRules {
  const one = <K extends RuleKind>(kind: K): ResolvedRule<K> => {
    const o = overrides[kind];
    const t: Record<string, number> = defaultsFor(kind, species);
    // One bad key must not throw the good ones away: each is checked on its own.
    for (const [key, value] of Object.entries(o?.thresholds ?? {})) {
      if (checkThresholds(kind, { [key]: value }).ok) t[key] = value;
    }
    return { enabled: o?.enabled ?? true, t: t as Thresholds<K> };
  };
  return {
    heat: one("heat"),
    chill: one("chill"),
    drying: one("drying"),
    soggy: one("soggy"),
    ammonia: one("ammonia"),
    silent_probe: one("silent_probe"),
    probe_fault: one("probe_fault"),
  };
}

export type RuleRow = { binId: string | null; kind: RuleKind; thresholds: Record<string, number>; enabled: boolean };

/** Rows of the rules table for a bin's farm: the farm's rule, then the bin's own laid over it key by key. */
export function overridesFromRuleRows(rows: readonly RuleRow[], binId: string): RuleOverrides {
  const out: RuleOverrides = {};
  const ordered = [...rows.filter((r) => r.binId === null), ...rows.filter((r) => r.binId === binId)];
  for (const r of ordered) {
    const prev = out[r.kind];
    out[r.kind] = { enabled: r.enabled, thresholds: { ...(prev?.thresholds ?? {}), ...r.thresholds } };
  }
  return out;
}

const MINUTE = 60_000;
const HOUR = 3_600_000;

/** How much history the runner must load for `evaluateZone` to see every duration it needs. */
export function lookback(rules: ResolvedRules): { readingsMs: number; feedingsMs: number; refusalsMs: number } {
  const { heat, chill, drying, soggy, ammonia, silent_probe: silent, probe_fault: fault } = rules;
  // Rate windows stretch to three reports of an hourly probe (context.ts windowMs).
  const rateWindowMs = Math.max(heat.t.riseWindowMinutes * MINUTE, ammonia.t.riskWindowMinutes * MINUTE, 3 * HOUR);
  const windowMs = Math.max(
    drying.t.trendWindowHours * HOUR,
    Math.max(fault.t.stuckHours, fault.t.stuckMaxHours) * HOUR,
    heat.t.rhythmDays * 24 * HOUR + rateWindowMs,
    rateWindowMs,
  );
  const holdMs =
    Math.max(
      heat.t.raiseMinutes,
      heat.t.settleMinutes,
      chill.t.raiseMinutes,
      chill.t.settleMinutes,
      drying.t.raiseMinutes,
      drying.t.settleMinutes,
      soggy.t.raiseMinutes,
      soggy.t.settleMinutes,
      ammonia.t.raiseMinutes,
      ammonia.t.settleMinutes,
      fault.t.raiseMinutes,
      fault.t.settleMinutes,
      silent.t.settleMinutes,
    ) * MINUTE;
  // An hour spare for probes whose clocks run late and for gaps at the start of a window.
  const readingsMs = windowMs + holdMs + HOUR;
  return {
    readingsMs,
    feedingsMs: Math.max(heat.t.feedingWatchHours, heat.t.feedingWatchMaxHours, ammonia.t.riskWatchHours) * HOUR + readingsMs,
    refusalsMs: Math.max(fault.t.raiseMinutes, fault.t.settleMinutes) * MINUTE + HOUR,
  };
}
