// The delivery worker: drains the outbox (db/queries/deliveries.ts) with a few sends in flight at
// once, so a push service that never answers holds one slot until its timeout and nothing else.
// Woken by NOTIFY on new rows (from this node or any other), by its own finished sends, and by a
// short poll for retries that fall due. Any number of workers, on any number of nodes, share the
// table: each row is claimed by one of them (FOR UPDATE SKIP LOCKED).
import createDebug from "debug";
import pg from "pg";
import {
  claimDeliveries,
  DELIVERIES_CHANNEL,
  endDelivery,
  nextDueIn,
  pruneDeliveries,
  retryDelivery,
  type ClaimedDelivery,
  type Ending,
  type NewDelivery,
} from "@/db/queries/deliveries";
import { appMailer } from "@/lib/server/mail/app-mailer";
import { pushOptions, sendToSubscription, topicOf } from "@/lib/server/alerts/deliver";
import type { MailContent } from "@/lib/server/alerts/notify";
import { env } from "@/lib/server/env";

const log = createDebug("wormward:delivery");

export type DeliveryWorkerOptions = {
  // Sends in flight at once on this worker.
  concurrency?: number;
  // Sends in flight at once for one farm, across all workers.
  perFarm?: number;
  // A send is tried this many times in all before it fails for good.
  maxAttempts?: number;
  // First retry after this long, doubling each time (with jitter), at most maxBackoffMs.
  backoffMs?: number;
  maxBackoffMs?: number;
  // Per push; defaults to PUSH_TIMEOUT_MS.
  timeoutMs?: number;
  pollMs?: number;
  // LISTEN for new rows from every writer.
  listenUrl?: string;
};

export type DeliveryWorker = {
  kick: () => void;
  // Resolves when nothing is due or in flight (retries waiting for later do not count).
  idle: (opts?: { includeRetries?: boolean; timeoutMs?: number }) => Promise<void>;
  stop: () => Promise<void>;
};

export function createDeliveryWorker(opts: DeliveryWorkerOptions = {}): DeliveryWorker {
  const concurrency = opts.concurrency ?? 8;
  const perFarm = opts.perFarm ?? Math.max(1, Math.floor(concurrency / 2));
  const maxAttempts = opts.maxAttempts ?? 5;
  const backoffMs = opts.backoffMs ?? 2_000;
  const maxBackoffMs = opts.maxBackoffMs ?? 5 * 60_000;
  const timeoutMs = opts.timeoutMs ?? env().PUSH_TIMEOUT_MS;
  const pollMs = opts.pollMs ?? 1_000;
  // Longer than any one send can take, so a live worker never loses its row to another.
  const leaseMs = 2 * timeoutMs + 60_000;

  let stopped = false;
  let pumping = false;
  let again = false;
  let timer: NodeJS.Timeout | null = null;
  const inFlight = new Set<Promise<void>>();
  let lastPrune = 0;

  // Exponential backoff with full jitter, so retries from many farms do not arrive in step.
  const backoff = (attempt: number, hint?: number) => Math.min(maxBackoffMs, Math.max(hint ?? 0, backoffMs * 2 ** (attempt - 1) * (0.5 + Math.random() / 2)));

  function mailFallback(d: ClaimedDelivery): NewDelivery | null {
    const p = d.payload as { mail?: MailContent; mailKey?: string };
    if (!p.mail || !p.mailKey || !d.userId || appMailer() === null) return null;
    return { dedupeKey: p.mailKey, farmId: d.farmId, alertId: d.alertId, userId: d.userId, channel: "email", reason: d.reason, payload: { mail: p.mail } };
  }

  function event(d: ClaimedDelivery, ok: boolean, detail: Record<string, unknown>): Ending["event"] {
    if (!d.alertId) return null;
    return {
      alertId: d.alertId,
      type: ok ? "sent" : "send_failed",
      userId: d.userId,
      channel: d.channel,
      detail: { reason: d.reason, attempts: d.attempts, ...detail },
    };
  }

  // A send that went out must be recorded as sent, or its lease runs out and it goes out again: while
  // the database is away (a restart, a failover) the ending is tried again, within half the lease.
  async function endSent(d: ClaimedDelivery, end: Ending) {
    const until = Date.now() + leaseMs / 2;
    for (let attempt = 0; ; attempt++) {
      try {
        return await endDelivery(d, end);
      } catch (err) {
        if (stopped || Date.now() > until) throw err;
        log("delivery %d sent but not yet recorded (%s); trying again", d.id, (err as Error).message);
        await new Promise((r) => setTimeout(r, Math.min(5_000, 200 * 2 ** attempt)));
      }
    }
  }

  async function sendPushRow(d: ClaimedDelivery) {
    const options = pushOptions();
    if (!options || !d.endpoint || !d.p256dh || !d.auth) {
      const why = options ? "the phone's subscription was removed" : "push is not set up on this server";
      await endDelivery(d, { state: "dropped", status: null, reason: why, event: event(d, false, { status: null, why }), mailFallback: mailFallback(d) });
      return;
    }
    const r = await sendToSubscription({ endpoint: d.endpoint, p256dh: d.p256dh, auth: d.auth }, (d.payload as { push?: object }).push ?? {}, {
      ...options,
      timeoutMs,
      topic: topicOf(d.dedupeKey),
    });
    if (r.ok) {
      await endSent(d, { state: "sent", status: r.status, reason: null, event: event(d, true, { status: r.status }) });
      log("delivery %d (push, %s) sent after %d attempt(s)", d.id, d.reason, d.attempts);
      return;
    }
    if (r.retry && d.attempts < maxAttempts) {
      const wait = backoff(d.attempts, r.retryAfterMs);
      await retryDelivery(d, wait, r.status, r.reason);
      log("delivery %d (push) attempt %d: %s; again in %d ms", d.id, d.attempts, r.reason, Math.round(wait));
      return;
    }
    const state = r.gone ? "gone" : "failed";
    const { mailed } = await endDelivery(d, {
      state,
      status: r.status,
      reason: r.reason,
      event: event(d, false, { status: r.status, why: r.reason, removed: r.gone }),
      mailFallback: mailFallback(d),
    });
    log("delivery %d (push) %s after %d attempt(s): %s%s", d.id, state, d.attempts, r.reason, mailed ? "; e-mail queued" : "");
  }

  async function sendMailRow(d: ClaimedDelivery) {
    const mailer = appMailer();
    const mail = (d.payload as { mail?: MailContent }).mail;
    if (!mailer || !mail || !d.email) {
      const why = mailer ? "no address or message to send" : "e-mail is not set up on this server";
      await endDelivery(d, { state: "dropped", status: null, reason: why, event: event(d, false, { why }) });
      return;
    }
    try {
      await mailer.send({ to: d.email, subject: mail.subject, text: mail.text });
    } catch (err) {
      // Our words, not the mail server's: its reply can carry addresses and host names.
      const why = "the mail server did not take the message";
      log("delivery %d (e-mail) attempt %d failed: %s", d.id, d.attempts, (err as Error).message);
      if (d.attempts < maxAttempts) await retryDelivery(d, backoff(d.attempts), null, why);
      else await endDelivery(d, { state: "failed", status: null, reason: why, event: event(d, false, { why }) });
      return;
    }
    await endSent(d, { state: "sent", status: null, reason: null, event: event(d, true, {}) });
  }

  function start(d: ClaimedDelivery) {
    const p: Promise<void> = (d.channel === "push" ? sendPushRow(d) : sendMailRow(d))
      .catch((err: Error) => log("delivery %d not finished (%s); its lease will run out and it is tried again", d.id, err.message))
      .finally(() => {
        inFlight.delete(p);
        void pump();
      });
    inFlight.add(p);
  }

  async function pump(): Promise<void> {
    if (stopped) return;
    if (pumping) {
      again = true;
      return;
    }
    pumping = true;
    let claimedAny = false;
    try {
      do {
        again = false;
        while (!stopped && inFlight.size < concurrency) {
          const rows = await claimDeliveries(concurrency - inFlight.size, leaseMs, perFarm);
          if (rows.length === 0) break;
          claimedAny = true;
          for (const d of rows) start(d);
        }
      } while (again && !stopped);
      if (Date.now() - lastPrune > 3600_000) {
        lastPrune = Date.now();
        const n = await pruneDeliveries();
        if (n) log("pruned %d finished deliveries", n);
      }
    } catch (err) {
      log("claim failed: %s", (err as Error).message);
    } finally {
      pumping = false;
    }
    await schedule(claimedAny);
  }

  async function schedule(claimedAny: boolean) {
    if (stopped) return;
    let wait = pollMs;
    try {
      const due = await nextDueIn();
      // Due now but nothing claimable: those rows are another worker's or their farm is at its
      // limit; a finished send here or the poll will pick them up.
      if (due !== null) wait = due > 0 ? Math.min(pollMs, due) : claimedAny ? 25 : pollMs;
    } catch {
      /* the poll tries again */
    }
    if (timer) clearTimeout(timer);
    timer = setTimeout(
      () => {
        timer = null;
        void pump();
      },
      Math.max(10, wait),
    );
    timer.unref();
  }

  let listener: pg.Client | null = null;
  async function listen(url: string, attempt = 0): Promise<void> {
    if (stopped) return;
    const c = new pg.Client({ connectionString: url });
    const retry = () => {
      listener = null;
      c.end().catch(() => undefined);
      setTimeout(() => void listen(url, attempt + 1), Math.min(5_000, 200 * 2 ** attempt)).unref();
    };
    c.on("notification", () => void pump());
    c.on("error", (err) => {
      log("listener lost (%s); reconnecting", err.message);
      retry();
    });
    try {
      await c.connect();
      await c.query(`listen ${DELIVERIES_CHANNEL}`);
      if (stopped) {
        await c.end();
        return;
      }
      listener = c;
      void pump(); // rows that arrived while not listening
    } catch (err) {
      log("listener not connected (%s); retrying", (err as Error).message);
      retry();
    }
  }
  if (opts.listenUrl) void listen(opts.listenUrl);
  void pump();

  return {
    kick: () => void pump(),
    async idle({ includeRetries = false, timeoutMs: limit = 60_000 } = {}) {
      const until = Date.now() + limit;
      for (;;) {
        await pump();
        const due = await nextDueIn();
        const waiting = due !== null && (includeRetries || due <= 0);
        if (inFlight.size === 0 && !pumping && !waiting) return;
        if (Date.now() > until) throw new Error("deliveries still pending");
        await new Promise((r) => setTimeout(r, 20));
      }
    },
    async stop() {
      stopped = true;
      if (timer) clearTimeout(timer);
      await listener?.end().catch(() => undefined);
      listener = null;
      await Promise.allSettled([...inFlight]);
    },
  };
}
