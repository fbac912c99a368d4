// The batching writer. A batch starts at once when a slot is free: what arrived in the same turn of
// the event loop goes together, so an idle service commits a lone message without waiting. Under
// load up to `maxInFlight` batches are being stored at once (one statement each, autocommit), and
// the messages arriving meanwhile queue up into the next batch, up to `maxRows` rows: the busier,
// the bigger the batches. Each submit() settles only after its batch commits (the PUBACK waits on
// it), and batches settle in the order they were taken, so acknowledgements keep the order the
// messages came in (MQTT 3.1.1 §4.6) even when a later batch commits first.
import createDebug from "debug";
import type { Db } from "@/db";
import type { ProbeStatusUpdate } from "@/db/queries/probes";
import { storeBatch, type ReadingInput, type RejectionInput } from "@/db/queries/readings";

const log = createDebug("wormward:ingest:writer");

export type WriteJob = {
  readings: ReadingInput[];
  rejections: RejectionInput[];
  status: ProbeStatusUpdate | null;
  origin: Omit<RejectionInput, "reason">;
};

/** maxRows: rows a batch takes at most; maxWaitMs: how long a batch waits for company before it
 * starts (0: it starts in the same turn of the event loop); maxInFlight: batches stored at once. */
export type BatchOptions = { maxRows: number; maxWaitMs: number; maxInFlight: number };
export type RetryOptions = { minMs: number; maxMs: number };

export type WriterOptions = {
  db: Db;
  batch?: Partial<BatchOptions>;
  retry?: Partial<RetryOptions>;
};

export type Writer = {
  submit(job: WriteJob): Promise<void>;
  close(timeoutMs?: number): Promise<void>;
  stats(): { batches: number; rows: number; retries: number };
};

// Two batches at once: one commits while the next is sent and planned (measured in
// tests/bench/ingest.bench.ts; a third added nothing on 2 cores). 4,000 rows: 1,000 probe reports.
export const DEFAULT_BATCH: BatchOptions = { maxRows: 4000, maxWaitMs: 0, maxInFlight: 2 };
const DEFAULT_RETRY: RetryOptions = { minMs: 100, maxMs: 5000 };

type Pending = { job: WriteJob; rows: number; at: number; resolve: () => void; reject: (err: Error) => void };
/** null: stored (or its refusal recorded); an Error: not stored, the submit rejects with it. */
type Outcome = Error | null;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

// Retry when the server is away or busy (SQLSTATE classes 08, 53, 57, 58, 40) or the socket failed (no SQLSTATE).
export function isTransient(err: unknown): boolean {
  for (let e = err as { code?: unknown; cause?: unknown } | undefined; e; e = e.cause as typeof e) {
    if (typeof e.code === "string" && /^[0-9A-Z]{5}$/.test(e.code)) return /^(08|53|57|58|40)/.test(e.code);
    if (!e.cause) break;
  }
  return true;
}

// drizzle's own message carries the whole query and its parameters: log the database's words instead.
function rootMessage(err: unknown): string {
  let e = err as { message?: string; cause?: unknown };
  while (e.cause && typeof e.cause === "object") e = e.cause as typeof e;
  return e.message ?? String(err);
}

export function createWriter(opts: WriterOptions): Writer {
  const batch = { ...DEFAULT_BATCH, ...opts.batch };
  const retry = { ...DEFAULT_RETRY, ...opts.retry };
  let queue: Pending[] = [];
  let queuedRows = 0;
  let timer: NodeJS.Timeout | null = null;
  let soon: NodeJS.Immediate | null = null;
  let inFlight = 0;
  // Settles after every batch taken so far has settled its messages: the next batch settles after it.
  let settled: Promise<void> = Promise.resolve();
  let closing = false;
  let giveUpAt = Infinity;
  const counts = { batches: 0, rows: 0, retries: 0 };
  const drained = new Set<() => void>();

  function schedule() {
    while (queue.length > 0 && inFlight < batch.maxInFlight) {
      const waited = Date.now() - queue[0]!.at;
      if (queuedRows >= batch.maxRows || closing || (batch.maxWaitMs > 0 && waited >= batch.maxWaitMs)) {
        take();
        continue;
      }
      if (batch.maxWaitMs > 0) {
        timer ??= setTimeout(() => {
          timer = null;
          schedule();
        }, batch.maxWaitMs - waited);
      } else {
        // The rest of this turn's messages (one socket read holds many PUBLISH packets) join it.
        soon ??= setImmediate(() => {
          soon = null;
          if (queue.length > 0 && inFlight < batch.maxInFlight) take();
          schedule();
        });
      }
      return;
    }
    if (queue.length === 0 && inFlight === 0) {
      for (const d of drained) d();
      drained.clear();
    }
  }

  function take() {
    if (timer) clearTimeout(timer);
    if (soon) clearImmediate(soon);
    timer = null;
    soon = null;
    let rows = 0;
    let n = 0;
    while (n < queue.length && (n === 0 || rows + queue[n]!.rows <= batch.maxRows)) rows += queue[n++]!.rows;
    const items = queue.slice(0, n);
    queue = queue.slice(n);
    queuedRows -= rows;
    inFlight++;
    const stored = storeWithRetry(items);
    const before = settled;
    settled = (async () => {
      const outcomes = await stored;
      await before;
      items.forEach((p, i) => {
        const err = outcomes[i];
        if (err) p.reject(err);
        else p.resolve();
      });
    })();
    void stored.finally(() => {
      inFlight--;
      schedule();
    });
  }

  async function storeWithRetry(items: Pending[]): Promise<Outcome[]> {
    for (let attempt = 0; ; attempt++) {
      try {
        const { inserted } = await writeBatch(items);
        counts.batches++;
        counts.rows += inserted;
        return items.map(() => null);
      } catch (err) {
        const why = rootMessage(err);
        if (!isTransient(err)) return storeOneByOne(items, why);
        if (Date.now() > giveUpAt) return items.map(() => new Error(`not stored before shutdown: ${why}`));
        const wait = Math.min(retry.maxMs, retry.minMs * 2 ** Math.min(attempt, 16));
        counts.retries++;
        log("batch of %d messages not stored (%s); retry %d in %d ms", items.length, why, attempt + 1, wait);
        await sleep(wait);
      }
    }
  }

  // Refused for its data, not availability: retry message by message; the bad one is recorded as rejected.
  async function storeOneByOne(items: Pending[], why: string): Promise<Outcome[]> {
    log("batch refused (%s); writing its %d messages one by one", why, items.length);
    if (items.length === 1) {
      const p = items[0]!;
      const reason = `store-failed: ${why}`.slice(0, 500);
      p.job = { ...p.job, readings: [], status: null, rejections: [{ ...p.job.origin, reason }] };
      try {
        await writeBatch([p]);
        return [null];
      } catch (err) {
        return [err as Error];
      }
    }
    const out: Outcome[] = [];
    for (const p of items) out.push(...(await storeWithRetry([p])));
    return out;
  }

  function writeBatch(items: Pending[]) {
    const readings: ReadingInput[] = [];
    const rejections: RejectionInput[] = [];
    const statuses: ProbeStatusUpdate[] = [];
    for (const { job } of items) {
      for (const r of job.readings) readings.push(r);
      for (const r of job.rejections) rejections.push(r);
      if (job.status) statuses.push(job.status);
    }
    // One statement: atomic on its own, so no BEGIN and COMMIT round trips.
    return storeBatch({ readings, rejections, statuses }, opts.db);
  }

  return {
    submit(job) {
      if (closing) return Promise.reject(new Error("the writer is closing"));
      return new Promise<void>((resolve, reject) => {
        const rows = job.readings.length + job.rejections.length;
        queue.push({ job, rows, at: Date.now(), resolve, reject });
        queuedRows += rows;
        schedule();
      });
    },
    async close(timeoutMs = 10_000) {
      closing = true;
      giveUpAt = Date.now() + timeoutMs;
      if (queue.length > 0 || inFlight > 0) {
        await new Promise<void>((resolve) => {
          drained.add(resolve);
          schedule();
        });
      }
      await settled;
    },
    stats: () => ({ ...counts }),
  };
}
