// One evaluation of a zone's rules: its recent readings, feedings, probes and open alerts read in
// one go, the rules resolved once (the same table sizes the lookback and judges the readings), and
// each transition applied to the alerts table and queued for the crew. The rule runner in ingest/
// decides when; this decides what.
import createDebug from "debug";
import { escalateAlert, getAlertRow, listUnnotifiedAlerts, raiseAlert, settleOpenAlert, takeDueReminders, updateOpenAlert } from "@/db/queries/alerts";
import { loadZoneRuleContext } from "@/db/queries/rule-inputs";
import {
  evaluateZone,
  lookback,
  overridesFromRuleRows,
  resolveRules,
  type ResolvedRules,
  type RuleKind,
  type RuleRow,
  type Transition,
} from "@/lib/domain/rules";
import { getSpecies, speciesProfiles } from "@/lib/domain/species";
import type { Metric } from "@/lib/domain/vocabulary";
import { feedingContexts, probeContexts } from "@/lib/server/rules/replay-input";
import { deliverHeldAlerts, notifyAlert } from "./notify";

const log = createDebug("wormward:rules");

/** Evaluates one zone at `at` (only `kinds`, when given) and applies what changed. */
export async function evaluateZoneNow(
  zoneId: string,
  at: Date,
  opts: { kinds?: RuleKind[]; onTransition?: (t: Transition, at: Date) => void } = {},
): Promise<Transition[]> {
  const { kinds } = opts;
  // Resolved once: the same rules size the lookback and judge the readings.
  let rules = null as ResolvedRules | null;
  const ctx = await loadZoneRuleContext(zoneId, at, {
    readings: !(kinds && kinds.every((k) => k === "silent_probe")),
    windows: (species, rows, binId) => {
      rules = resolveRules(getSpecies(species) ?? speciesProfiles["eisenia-fetida"], overridesFromRuleRows(rows as RuleRow[], binId));
      return lookback(rules);
    },
  });
  if (!ctx) return [];
  const species = getSpecies(ctx.bin.species);
  if (!species || !rules) {
    log("bin %s has unknown species %s; its rules are skipped", ctx.bin.id, ctx.bin.species);
    return [];
  }
  const series = new Map<string, { probeId: number; metric: Metric; points: { t: number; v: number }[] }>();
  for (const r of ctx.readings) {
    const key = `${r.probeId}:${r.metric}`;
    let s = series.get(key);
    if (!s) series.set(key, (s = { probeId: r.probeId, metric: r.metric as Metric, points: [] }));
    s.points.push({ t: new Date(r.ts).getTime(), v: r.value });
  }
  const transitions = evaluateZone({
    now: at.getTime(),
    zone: { id: ctx.zone.id, kind: ctx.zone.kind, binName: ctx.bin.name, zoneName: ctx.zone.name },
    species,
    rules,
    bed: { lengthCm: ctx.bin.lengthCm, widthCm: ctx.bin.widthCm, zoneCount: ctx.zoneCount },
    readings: [...series.values()],
    recentFeedings: feedingContexts(ctx.feedings),
    probes: probeContexts(ctx.probes, ctx.refusals),
    openAlerts: ctx.openAlerts.map((a) => ({
      subject: a.subject,
      kind: a.kind,
      level: a.level,
      state: a.state,
      raisedAt: a.raisedAt.getTime(),
      details: a.details,
      value: a.value,
      message: a.message,
    })),
    kinds,
    unitSystem: ctx.farm.unitSystem,
    timeZone: ctx.farm.timezone,
  });
  for (const t of transitions) {
    await apply(t, ctx.bin.farmId, ctx.bin.id, at);
    opts.onTransition?.(t, at);
  }
  return transitions;
}

// The alert row is committed before its deliveries are queued: if the database goes away between the
// two, queueing is tried again (for up to a minute; the dedupe keys make a repeat add nothing), since
// the next evaluation sees the alert open and would never queue them.
async function notifySurely(row: Parameters<typeof notifyAlert>[0], reason: Parameters<typeof notifyAlert>[1], at: Date) {
  const until = Date.now() + 60_000;
  for (let attempt = 0; ; attempt++) {
    try {
      return await notifyAlert(row, reason, at);
    } catch (err) {
      if (Date.now() > until) throw err;
      log("alert %s %s not queued yet (%s); trying again", row.id, reason, (err as Error).message);
      await new Promise((r) => setTimeout(r, Math.min(5_000, 200 * 2 ** attempt)));
    }
  }
}

async function apply(t: Transition, farmId: string, binId: string, at: Date) {
  const update = { value: t.value, message: t.message, details: t.details };
  if (t.type === "raise") {
    const row = await raiseAlert({ farmId, binId, zoneId: t.zoneId, probeId: t.probeId, subject: t.subject, kind: t.kind, level: t.level, ...update }, at);
    if (row) {
      log("raised %s %s: %s", t.level, t.subject, t.message);
      await notifySurely(row, "raised", at);
    }
  } else if (t.type === "escalate") {
    const row = await escalateAlert(t.subject, update, at);
    if (row) {
      log("escalated %s: %s", t.subject, t.message);
      await notifySurely(row, "escalated", at);
    }
  } else if (t.type === "update") {
    await updateOpenAlert(t.subject, update);
  } else {
    const row = await settleOpenAlert(t.subject, { value: t.value, message: t.message }, at);
    if (row) log("settled %s", t.subject);
  }
}

// How long a raise may wait for its deliveries before the sweep queues them (the raising process
// retries for a minute, notifySurely), and how old a raise may be and still be sent.
const UNNOTIFIED_GRACE_MS = 90_000;
const UNNOTIFIED_WITHIN_MS = 24 * 3600_000;

/** Reminds the crew of act-now alerts left unclaimed (after `afterMs`, then twice as long each time, at most three times), sends what quiet hours held back, and queues the deliveries of any raise or escalation whose process died before it queued them. */
export async function remindAndRelease(afterMs: number, at: Date) {
  for (const a of await takeDueReminders(afterMs, at)) await notifyAlert(a, "reminder", at);
  await deliverHeldAlerts(at);
  for (const { id, reason } of await listUnnotifiedAlerts(UNNOTIFIED_GRACE_MS, UNNOTIFIED_WITHIN_MS, at)) {
    const row = await getAlertRow(id);
    if (!row) continue;
    log("alert %s was %s but never queued; queueing it now", id, reason);
    await notifyAlert(row, reason, at, { recovering: true });
  }
}
