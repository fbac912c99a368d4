// Silent probe and probe fault: alerts about a probe, not the bed. A fault is a value the sensor
// cannot mean (lib/domain/metrics.ts range and error codes), stored or refused, or one that never moves.
import type { Metric } from "@/lib/domain/vocabulary";
import { METRICS, type MetricKey } from "../metrics";
import { formatNumber } from "../units";
import { HOUR, MINUTE, SETTLE_REPORTS, judge, valueFault, type RuleContext, type Trigger, type Verdict } from "./context";
import { firstAtOrAfter, holdsFor, resolutionOf, unchangedFor } from "./series";
import type { ProbeContext } from "./types";

export function silentVerdict(ctx: RuleContext, probe: ProbeContext): Verdict | null {
  const r = ctx.rules.silent_probe.t;
  const { w, now } = ctx;
  // Any message heard counts: a status message, or one whose values the ingest refused (a fault, not silence).
  const heard = [...(probe.refusals ?? []).map((x) => x.at), ...(probe.lastSeenAt === null ? [] : [probe.lastSeenAt])];
  const views = ctx.ofProbe(probe.id);
  const last = Math.max(...heard.filter(Number.isFinite), ...views.map((v) => v.raw[v.raw.length - 1]!.t));
  // A probe that has never reported is not installed yet, not silent.
  if (!Number.isFinite(last)) return null;
  const afterMs = ctx.silentAfterMs(probe);
  // The settle hold looks back at most its own length plus one gap.
  const from = last - r.settleMinutes * MINUTE - afterMs;
  const times = [...heard, ...views.flatMap((v) => v.raw.slice(firstAtOrAfter(v.raw, from)).map((p) => p.t))];
  const seen = [...new Set(times.filter((t) => Number.isFinite(t) && t >= from))].sort((a, b) => a - b).map((t) => ({ t }));
  const silent = now - last >= afterMs;
  const name = w.probe(probe, probe.id);
  // Settles only after SETTLE_REPORTS reports in a row and settleMinutes, none later than the
  // silent line: a probe that keeps dropping reports stays one open alert, not one per gap.
  const onTime = (seenAt: readonly { t: number }[]) => holdsFor(seenAt, () => true, afterMs - 1, r.settleMinutes * MINUTE, SETTLE_REPORTS);
  return {
    level: silent ? "heads_up" : null,
    clear: !silent && onTime(seen),
    probeId: probe.id,
    value: Math.floor((now - last) / MINUTE),
    message: `${w.place}: ${name} has sent nothing since ${w.clock(last)} (it reports every ${every(probe.reportIntervalS)}).`,
    settleMessage: `${w.place}: ${name} is reporting again.`,
    details: {
      probeId: probe.id,
      code: probe.code,
      lastSeenAt: last,
      silentForMs: now - last,
      silentAfterMs: afterMs,
      reportIntervalS: probe.reportIntervalS,
    },
  };
}

const every = (s: number) => (s < 60 ? `${s} s` : s % 60 === 0 ? `${s / 60} min` : `${formatNumber(s / 60, 1)} min`);

export type RefusalFault = { suffix: string; value: number | null; cause: "error-code" | "out-of-range" };

/** The fault in a rejected_messages reason (lib/domain/telemetry rejectionText); null for other refusals. */
export function refusalFault(reason: string): RefusalFault | null {
  const m = /^(sensor-error|out-of-range):\s*urn:dev:wormward:[^:\s]+:([^\s=]+)\s*=\s*(\S+)/.exec(reason);
  if (!m) return null;
  const value = Number(m[3]);
  return { suffix: m[2]!, value: Number.isFinite(value) ? value : null, cause: m[1] === "sensor-error" ? "error-code" : "out-of-range" };
}

/** Every fault in one rejected_messages row: a row stands for a message and keeps one reason a line. */
export const refusalFaults = (reason: string): RefusalFault[] => reason.split("\n").flatMap((line) => refusalFault(line) ?? []);

export { valueFault };

type Mark = { t: number; v: number | null; cause: RefusalFault["cause"] | null };
type Check = {
  id: string;
  suffix: string;
  metric: MetricKey | null;
  marks: Mark[];
  trigger: Trigger;
  clear: (i: number) => boolean;
  settleMs: number;
};

const STUCK_STEP: Partial<Record<Metric, "temperatureStepC" | "moistureStepPct" | "rawStepCounts">> = {
  temperature: "temperatureStepC",
  moisture: "moistureStepPct",
  "moisture-raw": "rawStepCounts",
};

export function faultVerdict(ctx: RuleContext, probe: ProbeContext): Verdict | null {
  const r = ctx.rules.probe_fault.t;
  const { w, now } = ctx;
  const gapMs = ctx.silentAfterMs(probe);
  const series = ctx.ofProbe(probe.id);

  // Faulty values, one channel per SenML name: a stored reading counts as good unless it is itself faulty.
  const bySuffix = new Map<string, { metric: MetricKey | null; marks: Mark[] }>();
  const channel = (suffix: string, metric: MetricKey | null) => {
    const c = bySuffix.get(suffix) ?? { metric, marks: [] };
    bySuffix.set(suffix, c);
    return c;
  };
  // Raising and settling look back at most their hold plus one gap.
  const from = now - Math.max(r.raiseMinutes, r.settleMinutes) * MINUTE - 2 * gapMs;
  for (const view of series) {
    const c = channel(METRICS[view.metric].suffix, view.metric);
    for (const p of view.raw.slice(firstAtOrAfter(view.raw, from))) c.marks.push({ t: p.t, v: p.v, cause: valueFault(view.metric, p.v) });
  }
  for (const ref of probe.refusals ?? []) {
    if (!Number.isFinite(ref.at) || ref.at < from) continue;
    for (const f of refusalFaults(ref.reason)) {
      const metric = (Object.values(METRICS).find((m) => m.suffix === f.suffix)?.key ?? null) as MetricKey | null;
      channel(f.suffix, metric).marks.push({ t: ref.at, v: f.value, cause: f.cause });
    }
  }

  const checks: Check[] = [];
  for (const [suffix, c] of [...bySuffix.entries()].sort((a, b) => a[0].localeCompare(b[0]))) {
    const marks = c.marks.sort((a, b) => a.t - b.t || Number(a.cause !== null) - Number(b.cause !== null));
    checks.push({
      id: `values:${suffix}`,
      suffix,
      metric: c.metric,
      marks,
      trigger: { id: "bad-value", level: "heads_up", holdMs: r.raiseMinutes * MINUTE, holds: (i) => marks[i]!.cause !== null },
      clear: (i) => marks[i]!.cause === null,
      settleMs: r.settleMinutes * MINUTE,
    });
  }
  const steps = new Map<Metric, number>();
  for (const view of series) {
    const stepKey = STUCK_STEP[view.metric];
    if (!stepKey) continue;
    const s = view.raw;
    // The probe's own step sets "no change": a whole-percent probe is judged in 1 % steps, and as a
    // steady bed reads the same for longer on it, its stuck line stretches by as much (up to stuckMaxHours).
    const step = resolutionOf(s, r[stepKey]);
    steps.set(view.metric, step);
    const stuckMs = Math.min(Math.max(r.stuckHours, r.stuckMaxHours), r.stuckHours * (r[stepKey] > 0 ? step / r[stepKey] : 1)) * HOUR;
    const stuck = (i: number) => unchangedFor(s, i, step) >= stuckMs;
    checks.push({
      id: `stuck:${view.metric}`,
      suffix: METRICS[view.metric].suffix,
      metric: view.metric,
      marks: s.map((p) => ({ t: p.t, v: p.v, cause: null })),
      trigger: { id: "stuck", level: "heads_up", holdMs: 0, holds: stuck },
      clear: (i) => !stuck(i),
      settleMs: r.settleMinutes * MINUTE,
    });
  }

  const fresh = checks.filter((c) => c.marks.length > 0 && c.marks[c.marks.length - 1]!.t > now - gapMs);
  if (fresh.length === 0) return null;
  const judged = fresh.map((c) => {
    const marks = c.marks.map((m) => ({ t: m.t, v: m.v ?? Number.NaN }));
    const view = { probeId: probe.id, probe, metric: (c.metric ?? "temperature") as Metric, s: marks, raw: marks, gapMs, stepMs: probe.reportIntervalS * 1000 };
    return { c, j: judge(view, [c.trigger], c.clear, c.settleMs) };
  });
  const bad = judged.find((x) => x.j.held !== null) ?? null;
  const name = w.probe(probe, probe.id);
  let message = `${w.place}: ${name} reads normally.`;
  let value: number | null = null;
  let cause: string | null = null;
  let since: number | null = null;
  if (bad) {
    const { c, j } = bad;
    const last = c.marks[j.i]!;
    const what = c.metric ? METRICS[c.metric].label.toLowerCase() : c.suffix;
    const unit = c.metric ? METRICS[c.metric].displayUnit : "";
    // Temperatures in the farm's units; an error code is a number the sensor sends, not a reading, so it has none.
    const inUnits = (v: number) => (c.metric === "temperature" ? w.temp(v, "fine") : `${Number(formatNumber(v, 2))}${unit ? ` ${unit}` : ""}`);
    const shown = (v: number | null) => (v === null ? "a value" : inUnits(v));
    if (j.held!.id === "stuck") {
      const s = c.marks.map((m) => ({ t: m.t, v: m.v! }));
      since = last.t - unchangedFor(s, j.i, steps.get(c.metric as Metric) ?? r[STUCK_STEP[c.metric as Metric]!]);
      value = last.v;
      cause = "stuck";
      message =
        `${w.place}: ${name} has read ${what} ${shown(last.v)} without change since ${w.clock(since)} ` +
        `(${w.span(last.t - since)}); the sensor may be stuck.`;
    } else {
      value = last.v;
      cause = last.cause;
      const range = c.metric ? METRICS[c.metric].range : null;
      message =
        last.cause === "error-code"
          ? `${w.place}: ${name} sends ${last.v === null ? "a value" : Number(formatNumber(last.v, 2))} for ${what}, a sensor error code, not a reading. Check its wiring.`
          : `${w.place}: ${name} sends ${shown(last.v)} for ${what}, outside what the sensor can measure` +
            `${!range ? "" : c.metric === "temperature" ? ` (${w.tempRange(range.min, range.max)})` : ` (${range.min}…${range.max}${unit ? ` ${unit}` : ""})`}. Check the probe.`;
    }
  }
  return {
    level: bad ? "heads_up" : null,
    clear: judged.every((x) => x.j.clear),
    probeId: probe.id,
    value,
    message,
    settleMessage: `${w.place}: ${name} reads normally again.`,
    details: {
      probeId: probe.id,
      code: probe.code,
      check: bad?.c.id ?? null,
      cause,
      metric: bad?.c.metric ?? null,
      value,
      stuckSince: since,
      faulty: judged.filter((x) => x.j.held !== null).map((x) => x.c.id),
    },
  };
}
