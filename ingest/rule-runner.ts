// The rule runner: evaluates the zones touched by each committed batch (at once, then coalesced, so a
// busy zone is evaluated at most once per `coalesceMs`), sweeps every minute for silent probes and for
// unclaimed act-now alerts, and applies the rules' transitions to the alerts table. All state is
// in the database; the open-alert unique index keeps two ingest nodes from raising one alert twice.
// Notifying only queues deliveries (lib/server/alerts/notify.ts); the delivery worker sends them, so no
// push service is ever awaited in this chain.
import { randomUUID } from "node:crypto";
import createDebug from "debug";
import type pg from "pg";
import { pool as sharedPool } from "@/db";
import { READINGS_CHANNEL } from "@/db/queries/readings";
import { listMonitoredZones, zonesOfProbes } from "@/db/queries/rule-inputs";
import type { RuleKind, Transition } from "@/lib/domain/rules";
import { evaluateZoneNow, remindAndRelease } from "@/lib/server/alerts/evaluate-zone";

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
  // Evaluate every monitored zone each time the LISTEN is (re)established: a NOTIFY sent while no
  // runner listened (this process starting again after a crash, the database restarting under it)
  // is never heard, and nothing else would judge those readings until the zone's next one.
  // ingest/main.ts turns it on; a runner made by a test hears only what it is told, unless asked.
  catchUp?: boolean;
  /**
   * The largest share of the runner's time spent evaluating (default 0.25): after an evaluation that
   * took longer than 20 ms, the next waits three times as long. The rules hold states for minutes,
   * so a zone judged a few seconds later loses nothing, while evaluations over days of readings
   * back to back would take the database from the writers and every farm's ingest would slow.
   */
  maxShare?: number;
  /** What evaluates one zone (default evaluateZoneNow); a test may time the runner with its own. */
  evaluateZone?: typeof evaluateZoneNow;
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

  const evaluateZone = opts.evaluateZone ?? evaluateZoneNow;
  const evaluate = (zoneId: string, kinds?: RuleKind[]) => evaluateZone(zoneId, now(), { kinds, onTransition: opts.onTransition });
  const share = Math.min(1, Math.max(0.01, opts.maxShare ?? 0.25));
  // Evaluations faster than this never wait: a quiet farm's zones are judged back to back.
  const SLOW_EVALUATION_MS = 20;
  let endRest: (() => void) | null = null;
  const restAfter = async (tookMs: number) => {
    if (tookMs <= SLOW_EVALUATION_MS || share >= 1 || stopped) return;
    await new Promise<void>((r) => {
      const t = setTimeout(r, (tookMs * (1 - share)) / share);
      endRest = () => {
        clearTimeout(t);
        r();
      };
    });
    endRest = null;
  };

  // A zone is evaluated as soon as it is heard of, then at most once per coalesceMs while its
  // readings keep coming: the first reading over a line raises its alert at once, and a busy zone
  // costs one evaluation per window however many batches touch it.
  const lastAt = new Map<string, number>();
  const queued = new Set<string>();
  let timerAt = Infinity;
  function flushSoon() {
    if (stopped || dirty.size === 0) return;
    let next = Infinity;
    for (const z of dirty) if (!queued.has(z)) next = Math.min(next, (lastAt.get(z) ?? -Infinity) + coalesceMs);
    if (next === Infinity) return; // every dirty zone is waiting for its own evaluation to end
    if (timer && timerAt <= next) return;
    if (timer) clearTimeout(timer);
    timerAt = next;
    timer = setTimeout(flush, Math.max(0, next - Date.now()));
  }

  function flush() {
    timer = null;
    timerAt = Infinity;
    const t = Date.now();
    for (const [z, at] of lastAt) if (at + coalesceMs <= t && !queued.has(z)) lastAt.delete(z);
    // A zone whose evaluation is still waiting or running stays dirty until it is done: when
    // evaluating takes longer than coalesceMs, the work waiting is one evaluation a zone, not a pile.
    const zones = [...dirty].filter((z) => !lastAt.has(z));
    for (const z of zones) {
      dirty.delete(z);
      lastAt.set(z, t);
      queued.add(z);
    }
    running = running.then(async () => {
      const failed: string[] = [];
      for (const z of zones) {
        if (stopped) break;
        const started = performance.now();
        try {
          await evaluate(z);
          await restAfter(performance.now() - started);
        } catch (err) {
          log("zone %s not evaluated: %s", z, (err as Error).message);
          failed.push(z);
        } finally {
          queued.delete(z);
          if (lastAt.get(z)! + coalesceMs <= Date.now()) lastAt.delete(z);
        }
      }
      flushSoon(); // what came in for these zones meanwhile
      for (const z of failed) dirty.add(z); // tried again with the next batch or sweep
    });
    flushSoon();
  }

  async function sweep() {
    for (const z of await listMonitoredZones()) {
      try {
        await evaluate(z, ["silent_probe"]);
      } catch (err) {
        log("sweep of zone %s failed: %s", z, (err as Error).message);
      }
    }
    await remindAndRelease(opts.reminderAfterMs ?? 15 * 60_000, now());
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
      // Queued before `ready` resolves, so any idle() fence is handled after it.
      if (opts.catchUp) handling = handling.then(catchUpAll);
      isReady = true;
      heard();
      log("listening for committed readings");
    } catch (err) {
      drop(err as Error);
    }
  }
  // Every monitored zone, once; tried again (a second later, then less often) while the database
  // cannot list them, unless a newer LISTEN has queued its own catch-up meanwhile.
  let catchUps = 0;
  async function catchUpAll(): Promise<void> {
    const mine = ++catchUps;
    for (let attempt = 0; !stopped && mine === catchUps; attempt++) {
      try {
        const zones = await listMonitoredZones();
        for (const z of zones) dirty.add(z);
        log("catching up: %d monitored zone(s) to evaluate", zones.length);
        flushSoon();
        return;
      } catch (err) {
        log("catch-up not listed (%s); again shortly", (err as Error).message);
        await new Promise((r) => setTimeout(r, Math.min(5_000, 1_000 * 2 ** attempt)).unref());
      }
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
      endRest?.();
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
