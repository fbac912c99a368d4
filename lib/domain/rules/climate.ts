// Heat, chill, drying and soggy: a zone's temperature or moisture against the species band, each
// with a heads-up line, an act-now line, a duration before raising, and a deadband plus a duration
// before settling. Heat also watches the rate of rise after a feeding; drying also the day's trend.
import { formatNumber } from "../units";
import { HOUR, MINUTE, judge, windowMs, worstOf, type Judged, type ProbeView, type RuleContext, type Trigger, type Verdict } from "./context";
import { rateAt, rhythmExcessAt, trendAt, type Sample, type Trend } from "./series";
import { withTrend } from "./words";

const memo = <T>(f: (i: number) => T) => {
  const seen = new Map<number, T>();
  return (i: number): T => {
    if (!seen.has(i)) seen.set(i, f(i));
    return seen.get(i)!;
  };
};

type BandKind = "heat" | "chill" | "drying" | "soggy";
type Reading = { metric: "temperature" | "moisture"; unit: "Cel" | "/100" };
/** What each band rule reads, with the stored SenML unit (RFC 8428 §12.1: Cel, /100). */
const READS: Record<BandKind, Reading> = {
  heat: { metric: "temperature", unit: "Cel" },
  chill: { metric: "temperature", unit: "Cel" },
  drying: { metric: "moisture", unit: "/100" },
  soggy: { metric: "moisture", unit: "/100" },
};
type Words = { message: string; settleMessage: string; details: Record<string, unknown> };

/** What a band rule decides for one probe's series: its triggers (worst first), when it counts as
 * back inside, and what its words need at the judged reading. */
type SeriesJudgement<E> = { triggers: Trigger[]; clear: (i: number) => boolean; extra: (i: number) => E };

/** A band rule's verdict on a zone: every fresh probe of the metric judged, the worst one speaks.
 * Every alert's details name the reading it stands on (metric, SenML unit, probe, trigger, value,
 * time); `words` adds the rule's own. */
function bandVerdict<E>(
  ctx: RuleContext,
  kind: BandKind,
  o: {
    judgeSeries: (view: ProbeView) => SeriesJudgement<E>;
    extremity: (j: Judged) => number;
    words: (worst: Judged, extra: E) => Words;
  },
): Verdict | null {
  const reading = READS[kind];
  const settleMs = ctx.rules[kind].t.settleMinutes * MINUTE;
  const extras = new Map<Judged, E>();
  const judged = ctx.fresh(reading.metric).map((view) => {
    const { triggers, clear, extra } = o.judgeSeries(view);
    const j = judge(view, triggers, clear, settleMs);
    extras.set(j, extra(j.i));
    return j;
  });
  const worst = worstOf(judged, o.extremity);
  if (!worst) return null;
  const { message, settleMessage, details } = o.words(worst, extras.get(worst)!);
  return {
    level: worst.held?.level ?? null,
    clear: judged.every((j) => j.clear),
    probeId: worst.view.probeId,
    value: worst.last.v,
    message,
    settleMessage,
    details: {
      ...reading,
      probeId: worst.view.probeId,
      trigger: worst.held?.id ?? null,
      value: worst.last.v,
      readingAt: worst.last.t,
      ...details,
    },
  };
}

/** The message of the trigger that held, or the near-the-edge words when none has. */
const said = (worst: Judged, near: string, byTrigger: Record<string, () => string>) => {
  const words = worst.held ? byTrigger[worst.held.id] : undefined;
  return words ? words() : near;
};

/** A band rule's two lines as triggers, each held `raiseMinutes` before raising: act now past the
 * far line, heads-up past the band's edge. `past` says which side is out (below for chill and
 * drying, above for soggy; heat's act-now line counts from the line itself). */
function bandTriggers(
  s: readonly Sample[],
  raiseMinutes: number,
  actNow: { id: string; past: (v: number) => boolean },
  headsUp: { id: string; past: (v: number) => boolean },
): Trigger[] {
  const holdMs = raiseMinutes * MINUTE;
  return [
    { id: actNow.id, level: "act_now", holdMs, holds: (i) => actNow.past(s[i]!.v) },
    { id: headsUp.id, level: "heads_up", holdMs, holds: (i) => headsUp.past(s[i]!.v) },
  ];
}

export function heatVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.heat.t;
  const { w } = ctx;
  const band = w.tempRange(ctx.input.species.temperatureC.comfortLow, r.headsUpAboveC);
  return bandVerdict(ctx, "heat", {
    judgeSeries: (view) => {
      const s = view.s;
      // The rise is judged against the zone's own day: the same hour on the previous days.
      const rhythm = memo((i) => rhythmExcessAt(s, i, windowMs(view, r.riseWindowMinutes), view.gapMs, r.rhythmDays));
      const rate = (i: number) => rhythm(i).rate;
      const watched = (i: number) => ctx.heavyFeedingAt(s[i]!.t);
      const fastRise = (i: number, limit: number) => watched(i) !== null && (rhythm(i).excess ?? Number.NEGATIVE_INFINITY) >= limit;
      return {
        triggers: [
          ...bandTriggers(s, r.raiseMinutes, { id: "warm-stress", past: (v) => v >= r.actNowAtC }, { id: "above-band", past: (v) => v > r.headsUpAboveC }),
          // The least-squares window is what makes the rise "sustained"; it needs no extra hold.
          { id: "fast-rise", level: "heads_up", holdMs: 0, holds: (i) => fastRise(i, r.riseRateCPerHour) },
        ],
        clear: (i) => s[i]!.v <= r.headsUpAboveC - r.deadbandC && !fastRise(i, r.riseRateCPerHour - r.riseDeadbandCPerHour),
        extra: (i) => {
          const h = watched(i);
          return {
            rate: rate(i),
            usualRate: rhythm(i).usual,
            feedingAt: h?.feeding.at ?? null,
            feedingKg: h?.feeding.totalKg ?? null,
            feedingKgPerM2: h?.kgPerM2 ?? null,
            watchUntil: h ? h.feeding.at + h.watchMs : null,
          };
        },
      };
    },
    extremity: (j) => j.last.v,
    words: (worst, { rate, usualRate, feedingAt, feedingKg, feedingKgPerM2, watchUntil }) => {
      const usual = usualRate !== null && Math.abs(usualRate) >= 0.1 && rate !== null ? ` (at this hour it usually ${w.tempTrend(usualRate)})` : "";
      const now = withTrend(w.temp(worst.last.v), w.tempTrend(rate));
      // The feeding's clock time, not "n h ago": a message that changes every minute is churn.
      const feed = feedingAt === null ? "" : ` since the ${feedingKg ? `${w.mass(feedingKg)} ` : ""}feeding at ${w.clock(feedingAt)}`;
      const message = said(worst, `${w.place}: ${now}, inside the comfortable ${band}.`, {
        "warm-stress": () => `${w.place}: ${now}, at or above ${w.temp(r.actNowAtC)} where ${w.worms} suffer. Cool the bed now.`,
        "above-band": () => `${w.place}: ${now}, above the comfortable ${band} for ${w.worms}.`,
        "fast-rise": () =>
          worst.last.v <= r.headsUpAboveC
            ? `${w.place}: ${now}${usual}${feed}. Still inside ${band}, but heating fast.`
            : `${w.place}: ${now}${usual}${feed}, leaving the comfortable ${band}.`,
      });
      return {
        message,
        settleMessage: `${w.place}: cooled to ${w.temp(worst.last.v)}, inside the band for ${w.span(r.settleMinutes * MINUTE)}.`,
        details: {
          ratePerHour: rate,
          usualRatePerHour: usualRate,
          feedingAt,
          feedingKgPerM2,
          watchUntil,
          headsUpAboveC: r.headsUpAboveC,
          actNowAtC: r.actNowAtC,
          riseRateCPerHour: r.riseRateCPerHour,
        },
      };
    },
  });
}

export function chillVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.chill.t;
  const heat = ctx.rules.heat.t;
  const { w } = ctx;
  const band = w.tempRange(r.headsUpBelowC, ctx.input.species.temperatureC.comfortHigh);
  return bandVerdict(ctx, "chill", {
    judgeSeries: (view) => ({
      triggers: bandTriggers(
        view.s,
        r.raiseMinutes,
        { id: "cold-stress", past: (v) => v < r.actNowBelowC },
        { id: "below-band", past: (v) => v < r.headsUpBelowC },
      ),
      clear: (i) => view.s[i]!.v >= r.headsUpBelowC + r.deadbandC,
      extra: (i) => rateAt(view.s, i, windowMs(view, heat.riseWindowMinutes), view.gapMs),
    }),
    extremity: (j) => -j.last.v,
    words: (worst, rate) => {
      const now = withTrend(w.temp(worst.last.v), w.tempTrend(rate));
      const message =
        worst.held?.id === "cold-stress"
          ? `${w.place}: ${now}, below ${w.temp(r.actNowBelowC)}, close to the cold that kills ${w.worms}. Warm the bed now.`
          : worst.held
            ? `${w.place}: ${now}, below the comfortable ${band} for ${w.worms}.`
            : `${w.place}: ${now}, inside the comfortable ${band}.`;
      return {
        message,
        settleMessage: `${w.place}: warmed to ${w.temp(worst.last.v)}, inside the band for ${w.span(r.settleMinutes * MINUTE)}.`,
        details: { ratePerHour: rate, headsUpBelowC: r.headsUpBelowC, actNowBelowC: r.actNowBelowC },
      };
    },
  });
}

const pointsRate = (perHour: number) => `${formatNumber(Math.abs(perHour), 2)} points/h`;
const moistureTrend = (t: Trend | null) =>
  !t || Math.abs(t.ratePerHour) < 0.01 ? "" : `${t.ratePerHour > 0 ? "rising" : "falling"} ${pointsRate(t.ratePerHour)}`;

export function dryingVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.drying.t;
  const { w } = ctx;
  const band = w.pctRange(r.headsUpBelowPct, ctx.input.species.moisturePct.comfortHigh);
  return bandVerdict(ctx, "drying", {
    judgeSeries: (view) => {
      const s = view.s;
      const trend = memo((i) => trendAt(s, i, r.trendWindowHours * HOUR, r.trendMinSpanHours * HOUR, r.headsUpBelowPct));
      const crossesWithin = (i: number, ms: number) => {
        const at = trend(i)?.crossingAt ?? null;
        return at !== null && at - s[i]!.t <= ms;
      };
      return {
        triggers: [
          ...bandTriggers(
            s,
            r.raiseMinutes,
            { id: "far-below-band", past: (v) => v < r.actNowBelowPct },
            { id: "below-band", past: (v) => v < r.headsUpBelowPct },
          ),
          // A day's least-squares line is already smooth; it needs no extra hold.
          { id: "drying-trend", level: "heads_up", holdMs: 0, holds: (i) => crossesWithin(i, r.trendHorizonHours * HOUR) },
        ],
        clear: (i) => s[i]!.v >= r.headsUpBelowPct + r.deadbandPct && !crossesWithin(i, r.trendSettleHorizonHours * HOUR),
        extra: trend,
      };
    },
    extremity: (j) => -j.last.v,
    words: (worst, trend) => {
      const now = withTrend(`moisture ${w.pct(worst.last.v)}`, moistureTrend(trend));
      const at = trend?.crossingAt ?? null;
      const message = said(worst, `${w.place}: ${now}, inside the comfortable ${band}.`, {
        "far-below-band": () => `${w.place}: ${now}, far below the comfortable ${band}. Water the bed now.`,
        "below-band": () => `${w.place}: ${now}, below the comfortable ${band} for ${w.worms}.`,
        "drying-trend": () =>
          `${w.place}: ${now}; at this rate it drops below ${w.pct(r.headsUpBelowPct)} in about ${w.span(at! - worst.last.t)} (around ${w.clock(at!)}).`,
      });
      return {
        message,
        settleMessage: `${w.place}: moisture back to ${w.pct(worst.last.v)}, inside the band for ${w.span(r.settleMinutes * MINUTE)}.`,
        details: {
          ratePerHour: trend?.ratePerHour ?? null,
          predictedAt: at,
          predictedAtIso: at === null ? null : new Date(at).toISOString(),
          headsUpBelowPct: r.headsUpBelowPct,
          actNowBelowPct: r.actNowBelowPct,
        },
      };
    },
  });
}

export function soggyVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.soggy.t;
  const dry = ctx.rules.drying.t;
  const { w } = ctx;
  const band = w.pctRange(ctx.input.species.moisturePct.comfortLow, r.headsUpAbovePct);
  return bandVerdict(ctx, "soggy", {
    judgeSeries: (view) => ({
      triggers: bandTriggers(
        view.s,
        r.raiseMinutes,
        { id: "far-above-band", past: (v) => v > r.actNowAbovePct },
        { id: "above-band", past: (v) => v > r.headsUpAbovePct },
      ),
      clear: (i) => view.s[i]!.v <= r.headsUpAbovePct - r.deadbandPct,
      extra: (i) => trendAt(view.s, i, dry.trendWindowHours * HOUR, dry.trendMinSpanHours * HOUR, r.headsUpAbovePct),
    }),
    extremity: (j) => j.last.v,
    words: (worst, trend) => {
      const now = withTrend(`moisture ${w.pct(worst.last.v)}`, moistureTrend(trend));
      const message =
        worst.held?.id === "far-above-band"
          ? `${w.place}: ${now}, far above the comfortable ${band}. Mix in dry bedding now.`
          : worst.held
            ? `${w.place}: ${now}, above the comfortable ${band} for ${w.worms}.`
            : `${w.place}: ${now}, inside the comfortable ${band}.`;
      return {
        message,
        settleMessage: `${w.place}: moisture down to ${w.pct(worst.last.v)}, inside the band for ${w.span(r.settleMinutes * MINUTE)}.`,
        details: { ratePerHour: trend?.ratePerHour ?? null, headsUpAbovePct: r.headsUpAbovePct, actNowAbovePct: r.actNowAbovePct },
      };
    },
  });
}
