// Evaluation of one zone: every kind's verdict, turned into transitions against the open alerts.
// The design is written at the top of lib/domain/rules/index.ts.
import type { AlertKind } from "@/lib/domain/vocabulary";
import { ammoniaVerdict } from "./ammonia";
import { chillVerdict, dryingVerdict, heatVerdict, soggyVerdict } from "./climate";
import { decide, makeContext, type RuleContext, type Verdict } from "./context";
import { ALERT_KINDS, resolveRules, type RuleKind } from "./params";
import { faultVerdict, silentVerdict } from "./probe-health";
import type { OpenAlert, ProbeContext, Transition, ZoneRuleInput } from "./types";
import { wordsFor } from "./words";

export const ZONE_ALERT_KINDS = ["heat", "chill", "drying", "soggy", "ammonia"] as const satisfies readonly RuleKind[];
export const PROBE_KINDS = ["silent_probe", "probe_fault"] as const satisfies readonly RuleKind[];
export type ZoneAlertKind = (typeof ZONE_ALERT_KINDS)[number];
export type ProbeAlertKind = (typeof PROBE_KINDS)[number];

export const isProbeKind = (kind: AlertKind): kind is ProbeAlertKind => (PROBE_KINDS as readonly string[]).includes(kind);

export const zoneSubject = (zoneId: string, kind: ZoneAlertKind) => `zone:${zoneId}:${kind}`;
export const probeSubject = (probeId: number, kind: ProbeAlertKind) => `probe:${probeId}:${kind}`;

const ZONE_VERDICTS: Record<ZoneAlertKind, (ctx: RuleContext) => Verdict | null> = {
  heat: heatVerdict,
  chill: chillVerdict,
  drying: dryingVerdict,
  soggy: soggyVerdict,
  ammonia: ammoniaVerdict,
};
const PROBE_VERDICTS: Record<ProbeAlertKind, (ctx: RuleContext, probe: ProbeContext) => Verdict | null> = {
  silent_probe: silentVerdict,
  probe_fault: faultVerdict,
};

const KIND_WORDS: Record<RuleKind, string> = {
  heat: "heat",
  chill: "chill",
  drying: "drying",
  soggy: "soggy",
  ammonia: "ammonia",
  silent_probe: "silent-probe",
  probe_fault: "probe-fault",
};

/** The transitions one zone's readings call for now, in kind order, then probe-id order. */
export function evaluateZone(input: ZoneRuleInput): Transition[] {
  const rules = input.rules ?? resolveRules(input.species, input.overrides);
  const w = wordsFor(input);
  const ctx = makeContext(input, rules, w);
  const wanted = new Set<RuleKind>(input.kinds ?? ALERT_KINDS);
  const open = new Map(input.openAlerts.filter((a) => a.state !== "settled").map((a) => [a.subject, a]));
  const out: Transition[] = [];

  const turnedOff = (subject: string, kind: RuleKind, probeId: number | null): Transition | null => {
    const o = open.get(subject);
    if (!o) return null;
    const message = `${w.place}: the ${KIND_WORDS[kind]} rule was turned off, so this alert is settled.`;
    return { type: "settle", subject, kind, level: o.level, zoneId: input.zone.id, probeId, value: null, message, details: { reason: "rule-off" } };
  };
  // The units a message was worded in: an open alert is worded anew only when they change.
  const unitSystem = input.unitSystem ?? "metric";
  const withUnits = (v: Verdict | null): Verdict | null => v && { ...v, details: { ...v.details, unitSystem } };
  const push = (t: Transition | null) => {
    if (t) out.push(t);
  };

  for (const kind of ALERT_KINDS) {
    if (!wanted.has(kind)) continue;
    if (isProbeKind(kind)) {
      for (const probe of [...input.probes].sort((a, b) => a.id - b.id)) {
        const subject = probeSubject(probe.id, kind);
        if (!rules[kind].enabled) push(turnedOff(subject, kind, probe.id));
        else push(decide({ subject, kind, zoneId: input.zone.id, probeId: probe.id }, open.get(subject), withUnits(PROBE_VERDICTS[kind](ctx, probe))));
      }
    } else {
      const subject = zoneSubject(input.zone.id, kind);
      if (!rules[kind].enabled) push(turnedOff(subject, kind, null));
      else push(decide({ subject, kind, zoneId: input.zone.id, probeId: null }, open.get(subject), withUnits(ZONE_VERDICTS[kind](ctx))));
    }
  }
  return out;
}

/** What the runner does to the alerts table, done in memory: the open alerts after `transitions`. */
export function applyTransitions(openAlerts: readonly OpenAlert[], transitions: readonly Transition[], now: number): OpenAlert[] {
  const open = new Map(openAlerts.filter((a) => a.state !== "settled").map((a) => [a.subject, { ...a }]));
  for (const t of transitions) {
    const a = open.get(t.subject);
    if (t.type === "raise" && !a) {
      const { subject, kind, level, details, value, message } = t;
      open.set(subject, { subject, kind, level, state: "raised", raisedAt: now, details, value, message });
    } else if (t.type === "settle") {
      open.delete(t.subject);
    } else if (a && (t.type === "escalate" || t.type === "update")) {
      open.set(t.subject, { ...a, level: t.level, details: t.details, value: t.value, message: t.message });
    }
  }
  return [...open.values()];
}
