// Messages wait until a batch is full (maxRows) or its oldest has waited maxWaitMs; one transaction
// then stores the batch, and each submit() settles only after that commit (the PUBACK waits on it).
import createDebug from "debug";
import type { Db } from "@/db";
import { updateProbeStatus, type ProbeStatusUpdate } from "@/db/queries/probes";
import { insertReadings, recordRejections, type ReadingInput, type RejectionInput } from "@/db/queries/readings";

const log = createDebug("wormward:ingest:writer");

export type WriteJob = {
  readings: ReadingInput[];
  rejections: RejectionInput[];
  status: ProbeStatusUpdate | null;
  origin: Omit<RejectionInput, "reason">;
};

export type BatchOptions = { maxRows: number; maxWaitMs: number };
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

export const DEFAULT_BATCH: BatchOptions = { maxRows: 2000, maxWaitMs: 25 };
const DEFAULT_RETRY: RetryOptions = { minMs: 100, maxMs: 5000 };

type Pending = { job: WriteJob; rows: number; at: number; resolve: () => void; reject: (err: Error) => void };

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
  let running: Promise<void> | null = null;
  let closing = false;
  let giveUpAt = Infinity;
  const counts = { batches: 0, rows: 0, retries: 0 };

  function schedule() {
    if (running || queue.length === 0) return;
    if (queuedRows >= batch.maxRows || closing) {
      if (timer) clearTimeout(timer);
      timer = null;
      running = drain();
    } else {
      timer ??= setTimeout(
        () => {
          timer = null;
          if (!running) running = drain();
        },
        Math.max(0, queue[0]!.at + batch.maxWaitMs - Date.now()),
      );
    }
  }

  async function drain() {
    try {
      while (queue.length > 0) {
        let rows = 0;
        let n = 0;
        while (n < queue.length && (n === 0 || rows + queue[n]!.rows <= batch.maxRows)) rows += queue[n++]!.rows;
        const taken = queue.slice(0, n);
        queue = queue.slice(n);
        queuedRows -= rows;
        await writeWithRetry(taken);
        if (queuedRows < batch.maxRows && !closing) break;
      }
    } finally {
      running = null;
      schedule();
    }
  }

  async function writeWithRetry(items: Pending[]) {
    for (let attempt = 0; ; attempt++) {
      try {
        const { inserted } = await writeBatch(items);
        counts.batches++;
        counts.rows += inserted;
        for (const p of items) p.resolve();
        return;
      } catch (err) {
        const why = rootMessage(err);
        if (!isTransient(err)) return writeOneByOne(items, why);
        if (Date.now() > giveUpAt) {
          for (const p of items) p.reject(new Error(`not stored before shutdown: ${why}`));
          return;
        }
        const wait = Math.min(retry.maxMs, retry.minMs * 2 ** Math.min(attempt, 16));
        counts.retries++;
        log("batch of %d messages not stored (%s); retry %d in %d ms", items.length, why, attempt + 1, wait);
        await sleep(wait);
      }
    }
  }

  // Refused for its data, not availability: retry message by message; the bad one is recorded as rejected.
  async function writeOneByOne(items: Pending[], why: string) {
    log("batch refused (%s); writing its %d messages one by one", why, items.length);
    if (items.length === 1) {
      const p = items[0]!;
      const reason = `store-failed: ${why}`.slice(0, 500);
      p.job = { ...p.job, readings: [], status: null, rejections: [{ ...p.job.origin, reason }] };
      return writeOnce(p);
    }
    for (const p of items) await writeWithRetry([p]);
  }

  async function writeOnce(p: Pending) {
    try {
      await writeBatch([p]);
      p.resolve();
    } catch (err) {
      p.reject(err as Error);
    }
  }

  async function writeBatch(items: Pending[]) {
    const readings = items.flatMap((p) => p.job.readings);
    const rejections = items.flatMap((p) => p.job.rejections);
    const statuses = items.flatMap((p) => (p.job.status ? [p.job.status] : []));
    return opts.db.transaction(async (tx) => {
      const stored = await insertReadings(readings, tx);
      await recordRejections(rejections, tx);
      await updateProbeStatus(statuses, tx);
      return stored;
    });
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
      schedule();
      while (running) await running;
    },
    stats: () => ({ ...counts }),
  };
}
