// Ammonia: measured where a probe reads NH3, otherwise estimated from the last feeding's mix check
// and whether the zone is warming. Cornell Waste Management Institute, "Compost Chemistry" (V):
// below about 30:1 C:N the excess nitrogen is lost as ammonia gas. Kaplan et al. 1980 (V): ammonia
// kills worms, so even a guess is worth a heads-up; a guess is never "act now".
import { formatNumber } from "../units";
import { HOUR, MINUTE, judge, windowMs, worstOf, type Judged, type RuleContext, type Trigger, type Verdict } from "./context";
import { rateAt } from "./series";
import type { FeedingContext } from "./types";

export function measuresAmmonia(ctx: RuleContext): boolean {
  return ctx.input.probes.some((p) => p.metrics.includes("ammonia")) || ctx.all("ammonia").length > 0;
}

export function ammoniaVerdict(ctx: RuleContext): Verdict | null {
  return measuresAmmonia(ctx) ? measuredVerdict(ctx) : estimatedVerdict(ctx);
}

function measuredVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.ammonia.t;
  const { w } = ctx;
  const judged = ctx.fresh("ammonia").map((view) => {
    const s = view.s;
    const triggers: Trigger[] = [
      { id: "act-now-level", level: "act_now", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v >= r.actNowAtPpm },
      { id: "heads-up-level", level: "heads_up", holdMs: r.raiseMinutes * MINUTE, holds: (i) => s[i]!.v >= r.headsUpAtPpm },
    ];
    return judge(view, triggers, (i) => s[i]!.v <= r.headsUpAtPpm - r.deadbandPpm, r.settleMinutes * MINUTE);
  });
  const worst = worstOf(judged, (j) => j.last.v);
  if (!worst) return null;
  const v = worst.last.v;
  const message =
    worst.held?.level === "act_now"
      ? `${w.place}: ammonia ${w.ppm(v)}, at or above ${w.ppm(r.actNowAtPpm)}. ` +
        "Open the bin, hold back nitrogen-rich food, and air the room before working in it."
      : worst.held
        ? `${w.place}: ammonia ${w.ppm(v)}, at or above ${w.ppm(r.headsUpAtPpm)}.`
        : `${w.place}: ammonia ${w.ppm(v)}, easing.`;
  return {
    level: worst.held?.level ?? null,
    clear: judged.every((j) => j.clear),
    probeId: worst.view.probeId,
    value: v,
    message,
    settleMessage: `${w.place}: ammonia down to ${w.ppm(v)} for ${w.span(r.settleMinutes * MINUTE)}.`,
    details: {
      mode: "measured",
      metric: "ammonia",
      unit: "ppm",
      probeId: worst.view.probeId,
      trigger: worst.held?.id ?? null,
      value: v,
      readingAt: worst.last.t,
      headsUpAtPpm: r.headsUpAtPpm,
      actNowAtPpm: r.actNowAtPpm,
    },
  };
}

/** `wet`: the mix was wet and is still young enough (riskWetHours) to count. */
type Risk = { feeding: FeedingContext; lowCn: boolean; wet: boolean; wetMix: boolean };

// Below this the zone counts as cooling ("falling" in the alert's words): the feed has passed its hottest.
const COOLING_C_PER_HOUR = -0.1;

function estimatedVerdict(ctx: RuleContext): Verdict | null {
  const r = ctx.rules.ammonia.t;
  const { w, now } = ctx;
  const watchMs = r.riskWatchHours * HOUR;
  const riskAt = (t: number): Risk | null => {
    const feeding = ctx.feedingAt(t, watchMs, true);
    if (!feeding) return null;
    const lowCn = (feeding.mixCn ?? Number.POSITIVE_INFINITY) < r.riskCnBelow;
    const wetMix = (feeding.mixMoisturePct ?? Number.NEGATIVE_INFINITY) > r.riskWetAbovePct;
    return { feeding, lowCn, wetMix, wet: wetMix && t - feeding.at <= r.riskWetHours * HOUR };
  };

  const rates = new Map<Judged, number | null>();
  const judged = ctx.fresh("temperature").map((view) => {
    const s = view.s;
    const win = windowMs(view, r.riskWindowMinutes);
    const rate = (i: number) => rateAt(s, i, win, view.gapMs);
    // A wet mix is a cause only while it is young and the zone is not cooling; warming is one always.
    const wetNow = (k: Risk, i: number) => k.wet && (rate(i) ?? 0) > COOLING_C_PER_HOUR;
    const risky = (i: number) => {
      const k = riskAt(s[i]!.t);
      return !!k?.lowCn && (wetNow(k, i) || (rate(i) ?? Number.NEGATIVE_INFINITY) >= r.riskWarmingCPerHour);
    };
    // The deadband sits below the trigger, so the estimate settles once warming eases off.
    const calm = (i: number) => {
      const k = riskAt(s[i]!.t);
      return !k?.lowCn || (!wetNow(k, i) && (rate(i) ?? Number.NEGATIVE_INFINITY) < r.riskWarmingCPerHour - r.riskWarmingDeadbandCPerHour);
    };
    const trigger: Trigger = { id: "mix-risk", level: "heads_up", holdMs: r.raiseMinutes * MINUTE, holds: risky };
    const j = judge(view, [trigger], calm, r.settleMinutes * MINUTE);
    rates.set(j, rate(j.i));
    return j;
  });

  const worst = worstOf(judged, (j) => rates.get(j) ?? Number.NEGATIVE_INFINITY);
  const risk = riskAt(worst ? worst.last.t : now);
  // Without a temperature probe the logbook is the only evidence: judge it as it stands now.
  const level = worst ? (worst.held?.level ?? null) : risk?.lowCn && risk.wet ? "heads_up" : null;
  const clear = worst ? judged.every((j) => j.clear) : !(risk?.lowCn && risk.wet);
  if (!worst && !risk) {
    return { level: null, clear: true, probeId: null, value: null, message: "", settleMessage: settleWords(ctx, null), details: { mode: "estimate" } };
  }

  const rate = worst ? (rates.get(worst) ?? null) : null;
  const reasons: string[] = [];
  if (risk) {
    const cn = risk.feeding.mixCn!;
    const when = w.clock(risk.feeding.at);
    reasons.push(
      risk.lowCn
        ? `the feeding at ${when} was rich in nitrogen (C:N ${formatNumber(cn, 0)}, below ${formatNumber(r.riskCnBelow, 0)}:1; ` +
            "below about 30:1 the extra nitrogen leaves as ammonia)"
        : `the feeding at ${when} was balanced (C:N ${formatNumber(cn, 0)})`,
    );
    if (risk.wetMix) reasons.push(`its mix was wet (${w.pct(risk.feeding.mixMoisturePct!)})`);
  }
  if (rate !== null && rate >= r.riskWarmingCPerHour) {
    reasons.push(`the zone is warming ${w.rate(rate)}, so the feed is breaking down fast`);
  } else if (rate !== null) {
    reasons.push(rate <= -0.1 ? `the zone is cooling ${w.rate(rate)}` : "the zone is not warming");
  } else if (!worst) {
    reasons.push("no probe here reads temperature");
  }
  const because = reasons.length ? `${capitalise(joinWords(reasons))}.` : "No nitrogen-rich feeding in the last few days.";
  return {
    level,
    clear,
    probeId: worst?.view.probeId ?? null,
    value: risk?.feeding.mixCn ?? null,
    message: `${w.place}: ammonia risk. ${because} No probe here measures ammonia; check the smell and air the bin.`,
    settleMessage: settleWords(ctx, risk),
    details: {
      mode: "estimate",
      probeId: worst?.view.probeId ?? null,
      trigger: level ? "mix-risk" : null,
      feedingAt: risk?.feeding.at ?? null,
      mixCn: risk?.feeding.mixCn ?? null,
      mixMoisturePct: risk?.feeding.mixMoisturePct ?? null,
      lowCn: risk?.lowCn ?? false,
      wet: risk?.wetMix ?? false,
      riskWetHours: r.riskWetHours,
      warmingCPerHour: rate,
      riskCnBelow: r.riskCnBelow,
      riskWetAbovePct: r.riskWetAbovePct,
      riskWarmingCPerHour: r.riskWarmingCPerHour,
    },
  };
}

function settleWords(ctx: RuleContext, risk: Risk | null): string {
  const { w } = ctx;
  const watch = formatNumber(ctx.rules.ammonia.t.riskWatchHours, 0);
  if (!risk) return `${w.place}: ammonia risk has passed; the nitrogen-rich feeding is more than ${watch} h old.`;
  if (!risk.lowCn) return `${w.place}: ammonia risk has passed; the last feeding was balanced.`;
  if (risk.wetMix) return `${w.place}: ammonia risk has passed; the zone is not warming and the wet feeding has settled.`;
  return `${w.place}: ammonia risk has passed; the zone has stopped warming.`;
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

function joinWords(parts: readonly string[]): string {
  if (parts.length <= 1) return parts[0] ?? "";
  return `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}`;
}
