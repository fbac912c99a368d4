// The rule runner: evaluates the zones touched by each committed batch (coalesced, so a busy zone
// is evaluated at most once per `coalesceMs`), sweeps every minute for silent probes and for
// unclaimed act-now alerts, and applies the rules' transitions to the alerts table. All state is
// in the database; the open-alert unique index keeps two ingest nodes from raising one alert twice.
// Notifying only queues deliveries (lib/alerts/notify.ts); the delivery worker sends them, so no
// push service is ever awaited in this chain.
import createDebug from "debug";
import pg from "pg";
import { READINGS_CHANNEL } from "@/db/queries/readings";
import { escalateAlert, raiseAlert, settleOpenAlert, takeDueReminders, updateOpenAlert } from "@/db/queries/alerts";
import { listMonitoredZones, loadZoneRuleContext, zonesOfProbes } from "@/db/queries/rule-inputs";
import type { Metric } from "@/db/schema";
import { deliverHeldAlerts, notifyAlert } from "@/lib/alerts/notify";
import { evaluateZone, lookback, overridesFromRuleRows, resolveRules, type RuleKind, type RuleRow, type Transition } from "@/lib/rules";
import { getSpecies, speciesProfiles } from "@/lib/species";

const log = createDebug("wormward:rules");

export type RuleRunnerOptions = {
  coalesceMs?: number;
  sweepMs?: number;
  reminderAfterMs?: number;
  now?: () => Date;
  onTransition?: (t: Transition, at: Date) => void;
  // LISTEN for committed readings from any writer (this node, the app's HTTP ingest, CSV imports).
  listenUrl?: string;
};

export type RuleRunner = {
  onCommitted: (zoneIds: string[]) => void;
  evaluate: (zoneId: string, kinds?: RuleKind[]) => Promise<Transition[]>;
  sweep: () => Promise<void>;
  idle: () => Promise<void>;
  stop: () => Promise<void>;
};

export function createRuleRunner(opts: RuleRunnerOptions = {}): RuleRunner {
  const coalesceMs = opts.coalesceMs ?? 2_000;
  const now = opts.now ?? (() => new Date());
  const dirty = new Set<string>();
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<void> = Promise.resolve();
  let stopped = false;

  async function evaluate(zoneId: string, kinds?: RuleKind[]): Promise<Transition[]> {
    const at = now();
    const ctx = await loadZoneRuleContext(zoneId, at, {
      readings: !(kinds && kinds.every((k) => k === "silent_probe")),
      windows: (species, rows, binId) =>
        lookback(resolveRules(getSpecies(species) ?? speciesProfiles["eisenia-fetida"], overridesFromRuleRows(rows as RuleRow[], binId))),
    });
    if (!ctx) return [];
    const species = getSpecies(ctx.bin.species);
    if (!species) {
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
      overrides: overridesFromRuleRows(ctx.rules as RuleRow[], ctx.bin.id),
      readings: [...series.values()],
      recentFeedings: ctx.feedings.map((f) => ({ at: f.at.getTime(), zoneId: f.zoneId, mixMoisturePct: f.mixMoisturePct, mixCn: f.mixCn, totalKg: f.totalKg })),
      probes: ctx.probes.map((p) => ({
        id: p.id,
        code: p.code,
        label: p.label,
        reportIntervalS: p.reportIntervalS,
        lastSeenAt: p.lastSeenAt?.getTime() ?? null,
        metrics: p.metrics,
        refusals: ctx.refusals.filter((r) => r.probeId === p.id).map((r) => ({ at: r.at.getTime(), reason: r.reason })),
      })),
      openAlerts: ctx.openAlerts.map((a) => ({ subject: a.subject, kind: a.kind, level: a.level, state: a.state, raisedAt: a.raisedAt.getTime(), details: a.details, value: a.value, message: a.message })),
      kinds,
      unitSystem: ctx.farm.unitSystem,
      timeZone: ctx.farm.timezone,
    });
    for (const t of transitions) await apply(t, ctx.bin.farmId, ctx.bin.id, at);
    return transitions;
  }

  async function apply(t: Transition, farmId: string, binId: string, at: Date) {
    const update = { value: t.value, message: t.message, details: t.details };
    if (t.type === "raise") {
      const row = await raiseAlert({ farmId, binId, zoneId: t.zoneId, probeId: t.probeId, subject: t.subject, kind: t.kind, level: t.level, ...update }, at);
      if (row) {
        log("raised %s %s: %s", t.level, t.subject, t.message);
        await notifyAlert(row, "raised", at);
      }
    } else if (t.type === "escalate") {
      const row = await escalateAlert(t.subject, update, at);
      if (row) {
        log("escalated %s: %s", t.subject, t.message);
        await notifyAlert(row, "escalated", at);
      }
    } else if (t.type === "update") {
      await updateOpenAlert(t.subject, update);
    } else {
      const row = await settleOpenAlert(t.subject, { value: t.value, message: t.message }, at);
      if (row) log("settled %s", t.subject);
    }
    opts.onTransition?.(t, at);
  }

  function flushSoon() {
    if (timer || stopped) return;
    timer = setTimeout(() => {
      timer = null;
      const zones = [...dirty];
      dirty.clear();
      running = running.then(async () => {
        for (const z of zones) {
          try {
            await evaluate(z);
          } catch (err) {
            log("zone %s not evaluated: %s", z, (err as Error).message);
            dirty.add(z); // try again with the next batch or sweep
          }
        }
      });
    }, coalesceMs);
  }

  async function sweep() {
    const zones = await listMonitoredZones();
    for (const z of zones) {
      try {
        await evaluate(z, ["silent_probe"]);
      } catch (err) {
        log("sweep of zone %s failed: %s", z, (err as Error).message);
      }
    }
    const due = await takeDueReminders(opts.reminderAfterMs ?? 15 * 60_000, now());
    for (const a of due) await notifyAlert(a, "reminder", now());
    await deliverHeldAlerts(now());
  }

  let listener: pg.Client | null = null;
  async function listen(url: string, attempt = 0): Promise<void> {
    if (stopped) return;
    const c = new pg.Client({ connectionString: url });
    c.on("notification", (n) => {
      void (async () => {
        const ids = JSON.parse(n.payload ?? "[]") as number[] | "*";
        const zones = ids === "*" ? await listMonitoredZones() : await zonesOfProbes(ids);
        for (const z of zones) dirty.add(z);
        flushSoon();
      })().catch((err: Error) => log("notification not handled: %s", err.message));
    });
    c.on("error", (err) => {
      log("listener lost (%s); reconnecting", err.message);
      listener = null;
      c.end().catch(() => undefined);
      setTimeout(() => void listen(url, attempt + 1), Math.min(5_000, 200 * 2 ** attempt)).unref();
    });
    try {
      await c.connect();
      await c.query(`listen ${READINGS_CHANNEL}`);
      listener = c;
      log("listening for committed readings");
    } catch (err) {
      log("listener not connected (%s); retrying", (err as Error).message);
      c.end().catch(() => undefined);
      setTimeout(() => void listen(url, attempt + 1), Math.min(5_000, 200 * 2 ** attempt)).unref();
    }
  }
  if (opts.listenUrl) void listen(opts.listenUrl);

  const sweeper = setInterval(() => {
    running = running.then(sweep).catch((err: Error) => log("sweep failed: %s", err.message));
  }, opts.sweepMs ?? 60_000);
  sweeper.unref();

  return {
    onCommitted(zoneIds) {
      for (const z of zoneIds) dirty.add(z);
      flushSoon();
    },
    evaluate,
    sweep,
    async idle() {
      while (timer || dirty.size) {
        await new Promise((r) => setTimeout(r, 50));
        if (!timer && dirty.size) flushSoon();
      }
      await running;
    },
    async stop() {
      stopped = true;
      clearInterval(sweeper);
      if (timer) clearTimeout(timer);
      await listener?.end().catch(() => undefined);
      await running;
    },
  };
}
