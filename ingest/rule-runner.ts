// The rule runner: evaluates the zones touched by each committed batch (coalesced, so a busy zone
// is evaluated at most once per `coalesceMs`), sweeps every minute for silent probes and for
// unclaimed act-now alerts, and applies the rules' transitions to the alerts table. All state is
// in the database; the open-alert unique index keeps two ingest nodes from raising one alert twice.
// Notifying only queues deliveries (lib/server/alerts/notify.ts); the delivery worker sends them, so no
// push service is ever awaited in this chain.
import { randomUUID } from "node:crypto";
import createDebug from "debug";
import type pg from "pg";
import { pool as sharedPool } from "@/db";
import { READINGS_CHANNEL } from "@/db/queries/readings";
import { escalateAlert, raiseAlert, settleOpenAlert, takeDueReminders, updateOpenAlert } from "@/db/queries/alerts";
import { listMonitoredZones, loadZoneRuleContext, zonesOfProbes } from "@/db/queries/rule-inputs";
import type { Metric } from "@/db/schema";
import { deliverHeldAlerts, notifyAlert } from "@/lib/server/alerts/notify";
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

const log = createDebug("wormward:rules");
// Each runner's own "heard everything so far" marker; see caughtUp().
const FENCE_CHANNEL = "wormward_rules_fence";

export type RuleRunnerOptions = {
  coalesceMs?: number;
  sweepMs?: number;
  reminderAfterMs?: number;
  now?: () => Date;
  onTransition?: (t: Transition, at: Date) => void;
  // The process's one pool (the writer's too); one of its connections LISTENs for committed
  // readings from any writer: this node, other nodes, the app's HTTP ingest, CSV imports.
  pool?: pg.Pool;
};

export type RuleRunner = {
  /** Resolves once the LISTEN is in place (again after a reconnect). */
  listening: () => Promise<void>;
  evaluate: (zoneId: string, kinds?: RuleKind[]) => Promise<Transition[]>;
  sweep: () => Promise<void>;
  /** Resolves when every reading committed before the call has been heard and its zone evaluated. */
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

  // LISTEN holds its connection for the runner's life, so it is checked out of the pool until
  // stop(); on an error the connection is destroyed (release(err)) and a fresh one listens.
  const db = opts.pool ?? sharedPool();
  let listener: pg.PoolClient | null = null;
  let heard!: () => void;
  let ready = new Promise<void>((r) => (heard = r));
  let isReady = false;
  // Notifications are handled one after another, in the order PostgreSQL delivers them.
  let handling: Promise<void> = Promise.resolve();
  const fences = new Map<string, () => void>();
  async function listen(attempt = 0): Promise<void> {
    if (stopped) return;
    const retry = () => setTimeout(() => void listen(attempt + 1), Math.min(5_000, 200 * 2 ** attempt)).unref();
    let c: pg.PoolClient;
    try {
      c = await db.connect();
    } catch (err) {
      log("listener not connected (%s); retrying", (err as Error).message);
      retry();
      return;
    }
    let lost = false;
    const drop = (err: Error) => {
      if (lost) return;
      lost = true;
      listener = null;
      if (isReady) {
        isReady = false;
        ready = new Promise<void>((r) => (heard = r));
      }
      // A fence sent on the lost connection never comes back; what it waited for is lost with it.
      for (const back of fences.values()) back();
      c.release(err);
      if (!stopped) {
        log("listener lost (%s); reconnecting", err.message);
        retry();
      }
    };
    c.on("notification", (n) => {
      handling = handling
        .then(async () => {
          if (n.channel === FENCE_CHANNEL) return fences.get(n.payload ?? "")?.();
          const ids = JSON.parse(n.payload ?? "[]") as number[] | "*";
          const zones = ids === "*" ? await listMonitoredZones() : await zonesOfProbes(ids);
          for (const z of zones) dirty.add(z);
          flushSoon();
        })
        .catch((err: Error) => log("notification not handled: %s", err.message));
    });
    c.on("error", drop);
    try {
      await c.query(`listen ${READINGS_CHANNEL}; listen ${FENCE_CHANNEL}`);
      if (stopped) return drop(new Error("stopped"));
      listener = c;
      isReady = true;
      heard();
      log("listening for committed readings");
    } catch (err) {
      drop(err as Error);
    }
  }
  void listen();

  // PostgreSQL delivers notifications in the order their transactions committed (NOTIFY, "Notes"),
  // so once our own fence comes back, every reading committed before it has been heard.
  async function caughtUp() {
    if (stopped) return;
    await ready;
    const token = randomUUID();
    const back = new Promise<void>((r) => fences.set(token, r));
    try {
      await db.query("select pg_notify($1, $2)", [FENCE_CHANNEL, token]);
      await back;
    } finally {
      fences.delete(token);
    }
  }

  const sweeper = setInterval(() => {
    running = running.then(sweep).catch((err: Error) => log("sweep failed: %s", err.message));
  }, opts.sweepMs ?? 60_000);
  sweeper.unref();

  return {
    listening: () => ready,
    evaluate,
    sweep,
    async idle() {
      await caughtUp();
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
      if (listener) {
        const c = listener;
        listener = null;
        // UNLISTEN before the connection goes back: a pooled connection must not keep hearing.
        await c.query("unlisten *").then(
          () => c.release(),
          (err: Error) => c.release(err),
        );
      }
      await running;
    },
  };
}
