// Heat, chill, drying and soggy: a zone's temperature or moisture against the species band, each
// with a heads-up line, an act-now line, a duration before raising, and a deadband plus a duration
// before settling. Heat also watches the rate of rise after a feeding; drying also the day's trend.
import { formatNumber } from "../units";
import { HOUR, MINUTE, judge, worstOf, type Judged, type RuleContext, type Trigger, type Verdict } from "./context";
import { rateAt, trendAt, type Trend } from "./series";
import { withTrend } from "./words";

const memo = <T>(f: (i: number) => T) => {
  const seen = new Map<number, T>();
  return (i: number): T => {
    if (!seen.has(i)) seen.set(i, f(i));
    return seen.get(i)!;
  };
};

/** The verdict on a zone's worst probe. Every alert's details name the reading it stands on
 * (metric, SenML unit, probe, trigger, value, time); `words` adds the rule's own. */
function zoneVerdict(
  judged: Judged[],
  extremity: (j: Judged) => number,
  reading: { metric: "temperature" | "moisture"; unit: "Cel" | "/100" },
  words: (worst: Judged) => { message: string; settleMessage: string; details: Record<string, unknown> },
): Verdict | null {
  const worst = worstOf(judged, extremity);
  if (!worst) return null;
  const { message, settleMessage, details } = words(worst);
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

export function heatVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.heat.t;
  const { w } = ctx;
  const watchMs = r.feedingWatchHours * HOUR;
  const extra = new Map<Judged, { rate: number | null; feedingAt: number | null; feedingKg: number | null }>();
  const judged = ctx.fresh("temperature").map((view) => {
    const s = view.s;
    const rate = memo((i) => rateAt(s, i, r.riseWindowMinutes * MINUTE, view.gapMs));
    const watched = (i: number) => ctx.feedingAt(s[i]!.t, watchMs);
    const fastRise = (i: number, limit: number) => watched(i) !== null && (rate(i) ?? Number.NEGATIVE_INFINITY) >= limit;
    const triggers: Trigger[] = [
      { id: "warm-stress", level: "act_now", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v >= r.actNowAtC },
      { id: "above-band", level: "heads_up", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v > r.headsUpAboveC },
      // The least-squares window is what makes the rise "sustained"; it needs no extra hold.
      { id: "fast-rise", level: "heads_up", holdMs: 0, holds: (i) => fastRise(i, r.riseRateCPerHour) },
    ];
    const clear = (i: number) => s[i]!.v <= r.headsUpAboveC - r.deadbandC && !fastRise(i, r.riseRateCPerHour - r.riseDeadbandCPerHour);
    const j = judge(view, triggers, clear, r.settleMinutes * MINUTE);
    const f = watched(j.i);
    extra.set(j, { rate: rate(j.i), feedingAt: f?.at ?? null, feedingKg: f?.totalKg ?? null });
    return j;
  });
  const band = w.tempRange(ctx.input.species.temperatureC.comfortLow, r.headsUpAboveC);
  return zoneVerdict(
    judged,
    (j) => j.last.v,
    { metric: "temperature", unit: "Cel" },
    (worst) => {
      const { rate, feedingAt, feedingKg } = extra.get(worst)!;
      const now = withTrend(w.temp(worst.last.v), w.tempTrend(rate));
      // The feeding's clock time, not "n h ago": a message that changes every minute is churn.
      const feed = feedingAt === null ? "" : ` since the ${feedingKg ? `${formatNumber(feedingKg, 1)} kg ` : ""}feeding at ${w.clock(feedingAt)}`;
      let message: string;
      switch (worst.held?.id) {
        case "warm-stress":
          message = `${w.place}: ${now}, at or above ${w.temp(r.actNowAtC)} where ${w.worms} suffer. Cool the bed now.`;
          break;
        case "above-band":
          message = `${w.place}: ${now}, above the comfortable ${band} for ${w.worms}.`;
          break;
        case "fast-rise":
          message =
            worst.last.v <= r.headsUpAboveC
              ? `${w.place}: ${now}${feed}. Still inside ${band}, but heating fast.`
              : `${w.place}: ${now}${feed}, leaving the comfortable ${band}.`;
          break;
        default:
          message = `${w.place}: ${now}, near the top of the comfortable ${band}.`;
      }
      return {
        message,
        settleMessage: `${w.place}: cooled to ${w.temp(worst.last.v)}, inside the band for ${w.span(r.settleMinutes * MINUTE)}.`,
        details: {
          ratePerHour: rate,
          feedingAt,
          headsUpAboveC: r.headsUpAboveC,
          actNowAtC: r.actNowAtC,
          riseRateCPerHour: r.riseRateCPerHour,
        },
      };
    },
  );
}

export function chillVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.chill.t;
  const heat = ctx.rules.heat.t;
  const { w } = ctx;
  const rates = new Map<Judged, number | null>();
  const judged = ctx.fresh("temperature").map((view) => {
    const s = view.s;
    const triggers: Trigger[] = [
      { id: "cold-stress", level: "act_now", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v < r.actNowBelowC },
      { id: "below-band", level: "heads_up", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v < r.headsUpBelowC },
    ];
    const j = judge(view, triggers, (i) => s[i]!.v >= r.headsUpBelowC + r.deadbandC, r.settleMinutes * MINUTE);
    rates.set(j, rateAt(s, j.i, heat.riseWindowMinutes * MINUTE, view.gapMs));
    return j;
  });
  const band = w.tempRange(r.headsUpBelowC, ctx.input.species.temperatureC.comfortHigh);
  return zoneVerdict(
    judged,
    (j) => -j.last.v,
    { metric: "temperature", unit: "Cel" },
    (worst) => {
      const now = withTrend(w.temp(worst.last.v), w.tempTrend(rates.get(worst) ?? null));
      const message =
        worst.held?.id === "cold-stress"
          ? `${w.place}: ${now}, below ${w.temp(r.actNowBelowC)} where ${w.worms} stop feeding. Warm the bed now.`
          : worst.held
            ? `${w.place}: ${now}, below the comfortable ${band} for ${w.worms}.`
            : `${w.place}: ${now}, near the bottom of the comfortable ${band}.`;
      return {
        message,
        settleMessage: `${w.place}: warmed to ${w.temp(worst.last.v)}, inside the band for ${w.span(r.settleMinutes * MINUTE)}.`,
        details: {
          ratePerHour: rates.get(worst) ?? null,
          headsUpBelowC: r.headsUpBelowC,
          actNowBelowC: r.actNowBelowC,
        },
      };
    },
  );
}

const pointsRate = (perHour: number) => `${formatNumber(Math.abs(perHour), 2)} points/h`;
const moistureTrend = (t: Trend | null) =>
  !t || Math.abs(t.ratePerHour) < 0.01 ? "" : `${t.ratePerHour > 0 ? "rising" : "falling"} ${pointsRate(t.ratePerHour)}`;

export function dryingVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.drying.t;
  const { w } = ctx;
  const trends = new Map<Judged, Trend | null>();
  const judged = ctx.fresh("moisture").map((view) => {
    const s = view.s;
    const trend = memo((i) => trendAt(s, i, r.trendWindowHours * HOUR, r.trendMinSpanHours * HOUR, r.headsUpBelowPct));
    const crossesWithin = (i: number, ms: number) => {
      const at = trend(i)?.crossingAt ?? null;
      return at !== null && at - s[i]!.t <= ms;
    };
    const triggers: Trigger[] = [
      { id: "far-below-band", level: "act_now", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v < r.actNowBelowPct },
      { id: "below-band", level: "heads_up", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v < r.headsUpBelowPct },
      // A day's least-squares line is already smooth; it needs no extra hold.
      { id: "drying-trend", level: "heads_up", holdMs: 0, holds: (i) => crossesWithin(i, r.trendHorizonHours * HOUR) },
    ];
    const clear = (i: number) => s[i]!.v >= r.headsUpBelowPct + r.deadbandPct && !crossesWithin(i, r.trendSettleHorizonHours * HOUR);
    const j = judge(view, triggers, clear, r.settleMinutes * MINUTE);
    trends.set(j, trend(j.i));
    return j;
  });
  const band = w.pctRange(r.headsUpBelowPct, ctx.input.species.moisturePct.comfortHigh);
  return zoneVerdict(
    judged,
    (j) => -j.last.v,
    { metric: "moisture", unit: "/100" },
    (worst) => {
      const trend = trends.get(worst) ?? null;
      const now = withTrend(`moisture ${w.pct(worst.last.v)}`, moistureTrend(trend));
      const at = trend?.crossingAt ?? null;
      let message: string;
      switch (worst.held?.id) {
        case "far-below-band":
          message = `${w.place}: ${now}, far below the comfortable ${band}. Water the bed now.`;
          break;
        case "below-band":
          message = `${w.place}: ${now}, below the comfortable ${band} for ${w.worms}.`;
          break;
        case "drying-trend":
          message =
            `${w.place}: ${now}; at this rate it drops below ${w.pct(r.headsUpBelowPct)} ` + `in about ${w.span(at! - worst.last.t)} (around ${w.clock(at!)}).`;
          break;
        default:
          message = `${w.place}: ${now}, near the bottom of the comfortable ${band}.`;
      }
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
  );
}

export function soggyVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.soggy.t;
  const dry = ctx.rules.drying.t;
  const { w } = ctx;
  const trends = new Map<Judged, Trend | null>();
  const judged = ctx.fresh("moisture").map((view) => {
    const s = view.s;
    const triggers: Trigger[] = [
      { id: "far-above-band", level: "act_now", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v > r.actNowAbovePct },
      { id: "above-band", level: "heads_up", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v > r.headsUpAbovePct },
    ];
    const j = judge(view, triggers, (i) => s[i]!.v <= r.headsUpAbovePct - r.deadbandPct, r.settleMinutes * MINUTE);
    trends.set(j, trendAt(s, j.i, dry.trendWindowHours * HOUR, dry.trendMinSpanHours * HOUR, r.headsUpAbovePct));
    return j;
  });
  const band = w.pctRange(ctx.input.species.moisturePct.comfortLow, r.headsUpAbovePct);
  return zoneVerdict(
    judged,
    (j) => j.last.v,
    { metric: "moisture", unit: "/100" },
    (worst) => {
      const now = withTrend(`moisture ${w.pct(worst.last.v)}`, moistureTrend(trends.get(worst) ?? null));
      const message =
        worst.held?.id === "far-above-band"
          ? `${w.place}: ${now}, far above the comfortable ${band}. Mix in dry bedding now.`
          : worst.held
            ? `${w.place}: ${now}, above the comfortable ${band} for ${w.worms}.`
            : `${w.place}: ${now}, near the top of the comfortable ${band}.`;
      return {
        message,
        settleMessage: `${w.place}: moisture down to ${w.pct(worst.last.v)}, inside the band for ${w.span(r.settleMinutes * MINUTE)}.`,
        details: {
          ratePerHour: trends.get(worst)?.ratePerHour ?? null,
          headsUpAbovePct: r.headsUpAbovePct,
          actNowAbovePct: r.actNowAbovePct,
        },
      };
    },
  );
}
