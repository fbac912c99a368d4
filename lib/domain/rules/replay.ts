// Replays a zone's history through the rules as the runner would have met it: at each instant only
// what had arrived by then, with the open alerts carried from one step to the next. For tests, the
// probe-fleet scenarios, and "what would this rule change have done last week".
import { applyTransitions, evaluateZone } from "./evaluate";
import { lookback, resolveRules } from "./params";
import { cleanSeries, firstAtOrAfter } from "./series";
import type { OpenAlert, Transition, ZoneRuleInput } from "./types";

export type ReplayInput = Omit<ZoneRuleInput, "now" | "openAlerts"> & { openAlerts?: readonly OpenAlert[] };
export type ReplayStep = { at: number; transitions: Transition[]; open: OpenAlert[] };

export function replay(input: ReplayInput, times: readonly number[]): ReplayStep[] {
  const { readingsMs } = lookback(resolveRules(input.species, input.overrides));
  const series = input.readings.map((r) => ({ ...r, points: cleanSeries(r.points) }));
  let open: OpenAlert[] = [...(input.openAlerts ?? [])];
  const steps: ReplayStep[] = [];
  for (const at of times) {
    const readings = series.map((r) => ({
      ...r,
      points: r.points.slice(firstAtOrAfter(r.points, at - readingsMs), firstAtOrAfter(r.points, at + 1)),
      clean: true,
    }));
    const probes = input.probes.map((p) => ({
      ...p,
      lastSeenAt: p.lastSeenAt !== null && p.lastSeenAt <= at ? p.lastSeenAt : null,
      refusals: (p.refusals ?? []).filter((x) => x.at <= at),
    }));
    const recentFeedings = input.recentFeedings.filter((f) => f.at <= at);
    const transitions = evaluateZone({ ...input, now: at, readings, probes, recentFeedings, openAlerts: open });
    open = applyTransitions(open, transitions, at);
    steps.push({ at, transitions, open });
  }
  return steps;
}
