// The scenario library's tools: deterministic series (a seeded generator, no Math.random), a replay
// of the rules over them as the runner would have met them, and the score of what the rules raised
// against what each scenario says they must: each expected alert within its delay of the cause, and
// nothing else (a second raise of the same kind counts as a false alarm: flapping).
import fs from "node:fs";
import path from "node:path";
import { replay, type FeedingContext, type ProbeContext, type ProbeSeries, type ReplayInput, type RuleKind, type Transition } from "@/lib/domain/rules";
import type { AlertLevel } from "@/lib/domain/vocabulary";

export const MIN = 60_000;
export const HOUR = 60 * MIN;
export const DAY = 24 * HOUR;
/** Scenarios start at local midnight UTC, so "09:00" is 9 h in. */
export const T0 = Date.UTC(2026, 2, 2, 0, 0, 0);

/** mulberry32: a small seeded generator, so every run draws the same series. */
export function seeded(seed: number) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  /** Roughly normal (sum of uniforms), mean 0, standard deviation `sd`. */
  const noise = (sd: number) => ((next() + next() + next() + next() - 2) / Math.sqrt(4 / 12)) * sd;
  return { next, noise };
}

/** Readings every `everyMs` over [from, to), value f(t) rounded to `step`. */
export function sample(f: (t: number) => number, o: { from?: number; to: number; everyMs: number; step?: number; skip?: (t: number) => boolean }) {
  const out: { t: number; v: number }[] = [];
  for (let t = o.from ?? T0; t < o.to; t += o.everyMs) {
    if (o.skip?.(t)) continue;
    const v = f(t);
    out.push({ t, v: o.step ? Math.round(v / o.step) * o.step : v });
  }
  return out;
}

/** The first time a generated series meets a condition: the cause an alert is timed from. */
export function firstWhen(points: readonly { t: number; v: number }[], cond: (v: number) => boolean, after = Number.NEGATIVE_INFINITY): number {
  const p = points.find((x) => x.t >= after && cond(x.v));
  if (!p) throw new Error("the scenario never meets its own cause");
  return p.t;
}

export type Expected = {
  kind: RuleKind;
  level: AlertLevel;
  /** When the cause began (a line crossed, a feeding heating, a probe gone quiet). */
  causeAt: number;
  withinMin: number;
  /** Where the expectation comes from: a published source or "common practice". */
  source: string;
};

export type Scenario = {
  name: string;
  /** What the scenario stands for and why nothing else may be raised, with its source. */
  why: string;
  input: ReplayInput;
  /** When the rules are run: each reading's arrival, or every minute for the silent-probe sweep. */
  times: number[];
  expect: Expected[];
  /** Kinds that must have settled by the end (their causes gone). */
  settledByEnd?: RuleKind[];
};

export type Raised = { kind: RuleKind; level: AlertLevel; at: number; type: Transition["type"] };

export type Score = {
  name: string;
  expected: string;
  raised: string;
  /** Minutes from cause to alert, per expected alert (null: missed). */
  delays: (number | null)[];
  missed: Expected[];
  falseAlarms: Raised[];
  /** Raises and escalations: what would have pushed a phone. */
  alertCount: number;
  openAtEnd: RuleKind[];
};

const label = (kind: string, level: string) => `${kind.replace("_", " ")} ${level.replace("_", "-")}`;

export function score(s: Scenario): Score {
  const steps = replay(s.input, s.times);
  const pushes: Raised[] = steps.flatMap((st) =>
    st.transitions.filter((t) => t.type === "raise" || t.type === "escalate").map((t) => ({ kind: t.kind, level: t.level, at: st.at, type: t.type })),
  );
  const used = new Set<Raised>();
  const delays = s.expect.map((e) => {
    const hit = pushes.find((p) => !used.has(p) && p.kind === e.kind && p.level === e.level && p.at >= e.causeAt && p.at - e.causeAt <= e.withinMin * MIN);
    if (!hit) return null;
    used.add(hit);
    return Math.round((hit.at - e.causeAt) / MIN);
  });
  const openAtEnd = (steps[steps.length - 1]?.open ?? []).map((a) => a.kind);
  return {
    name: s.name,
    expected: s.expect.length ? s.expect.map((e) => `${label(e.kind, e.level)} ≤ ${e.withinMin} min`).join("; ") : "none",
    raised: pushes.length ? pushes.map((p) => label(p.kind, p.level)).join("; ") : "none",
    delays,
    missed: s.expect.filter((_, k) => delays[k] === null),
    falseAlarms: pushes.filter((p) => !used.has(p)),
    alertCount: pushes.length,
    openAtEnd,
  };
}

/** The table for the note: scenario, expected, raised, detection delay, alert count. */
export function table(scores: readonly Score[]): string {
  const rows = scores.map((x) => {
    const delay = x.delays.length ? x.delays.map((d) => (d === null ? "missed" : `${d} min`)).join(", ") : "—";
    return `| ${x.name} | ${x.expected} | ${x.raised} | ${delay} | ${x.alertCount} |`;
  });
  return ["| scenario | expected | raised | detection delay | alerts |", "|---|---|---|---|---|", ...rows].join("\n");
}

export function writeTable(scores: readonly Score[]) {
  const dir = path.resolve(import.meta.dirname, "../../../.data");
  fs.mkdirSync(dir, { recursive: true });
  fs.writeFileSync(path.join(dir, "scenarios.md"), `# Rule scenarios\n\n${table(scores)}\n`);
}

export const probe = (id: number, reportIntervalS: number, metrics: string[]): ProbeContext => ({
  id,
  code: `p-${id}`,
  reportIntervalS,
  lastSeenAt: null,
  metrics,
});

export type { FeedingContext, ProbeSeries };
