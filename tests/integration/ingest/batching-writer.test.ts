// The batching writer against the real database: batches close by count and by time, a message
// the database refuses cannot hold back the others, and each commit of new readings is announced
// on the readings channel (the rule runner's only way to hear of them).
import { sql } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, it } from "vitest";
import { db, pool, type Db } from "@/db";
import { READINGS_CHANNEL, type ReadingInput } from "@/db/queries/readings";
import type { Metric } from "@/db/schema";
import { createWriter, type WriteJob, type Writer } from "@/ingest/writer";
import { countReadings, createProbes, rejectionsOf, waitFor, type TestProbe } from "./helpers";

let fleet: TestProbe[];
let more: TestProbe[];
let writer: Writer | null = null;
const t0 = Math.floor(Date.now() / 3_600_000) * 3_600_000 - 6 * 3_600_000;

beforeAll(async () => {
  fleet = await createProbes(4);
  more = await createProbes(4);
});

// The real database behind a door: `before` runs ahead of each statement the writer sends and may
// hold it back or fail it, as a slow or lost server would.
function doorDb(before: (call: number) => Promise<void>): Db {
  const real = db();
  let calls = 0;
  return new Proxy(real, {
    get(target, key) {
      if (key === "execute") {
        return async (q: Parameters<Db["execute"]>[0]) => {
          await before(++calls);
          return target.execute(q);
        };
      }
      const v = Reflect.get(target, key, target) as unknown;
      return typeof v === "function" ? (v as (...a: unknown[]) => unknown).bind(target) : v;
    },
  });
}
const serverGone = () => Object.assign(new Error("terminating connection due to administrator command"), { code: "57P01" });
const turns = async (n: number) => {
  for (let i = 0; i < n; i++) await new Promise((r) => setImmediate(r));
};
afterEach(async () => {
  await writer?.close();
  writer = null;
});

function job(p: TestProbe, readings: ReadingInput[]): WriteJob {
  const origin = { farmId: p.farmId, probeId: p.id, source: "mqtt" as const, topic: `wormward/${p.code}/readings`, excerpt: "[...]" };
  return { readings, rejections: [], status: { probeId: p.id, seenAt: new Date() }, origin };
}
const temps = (p: TestProbe, n: number, from = 0): ReadingInput[] =>
  Array.from({ length: n }, (_, i) => ({ probeId: p.id, metric: "temperature", ts: new Date(t0 + (from + i) * 1000), value: 20 + (i % 7) }));

describe("the batching writer", () => {
  it("writes a full batch at once, without waiting for the time limit", async () => {
    const p = fleet[0]!;
    writer = createWriter({ db: db(), batch: { maxRows: 500, maxWaitMs: 600_000 } });
    // Two full batches of two 250-row messages each; the time limit alone would never fire.
    await Promise.all([0, 1, 2, 3].map((k) => writer!.submit(job(p, temps(p, 250, k * 250)))));
    expect(writer.stats()).toEqual({ batches: 2, rows: 1000, retries: 0 });
    expect(await countReadings([p.id])).toEqual({ rows: 1000, distinct: 1000, rolled: 1000 });
  });

  it("holds a small batch until its oldest message has waited maxWaitMs", async () => {
    const p = fleet[1]!;
    writer = createWriter({ db: db(), batch: { maxRows: 1000, maxWaitMs: 300 } });
    const started = Date.now();
    let settledAt = 0;
    const done = writer.submit(job(p, temps(p, 1))).then(() => (settledAt = Date.now()));
    await new Promise((r) => setTimeout(r, 150));
    expect(settledAt).toBe(0);
    expect((await countReadings([p.id])).rows).toBe(0);
    await done;
    expect(settledAt - started).toBeGreaterThanOrEqual(290);
    expect((await countReadings([p.id])).rows).toBe(1);
  });

  it("commits what it holds when closed", async () => {
    const p = fleet[1]!;
    writer = createWriter({ db: db(), batch: { maxRows: 1000, maxWaitMs: 600_000 } });
    const done = writer.submit(job(p, temps(p, 5, 100)));
    await writer.close();
    await done;
    expect((await countReadings([p.id])).rows).toBe(1 + 5);
    await expect(writer.submit(job(p, temps(p, 1, 200)))).rejects.toThrow(/closing/);
  });

  it("records a message the database refuses as store-failed and stores the rest of its batch", async () => {
    const [good, bad] = [fleet[2]!, fleet[3]!];
    writer = createWriter({ db: db(), batch: { maxRows: 1000, maxWaitMs: 50 } });
    // A metric the database's enum does not know, as when code runs ahead of its migration.
    const unknown = [{ probeId: bad.id, metric: "pressure" as Metric, ts: new Date(t0), value: 1 }];
    const results = await Promise.allSettled([
      writer.submit(job(good, temps(good, 3))),
      writer.submit(job(bad, unknown)),
      writer.submit(job(good, temps(good, 3, 3))),
    ]);
    expect(results.map((r) => r.status)).toEqual(["fulfilled", "fulfilled", "fulfilled"]);
    expect((await countReadings([good.id])).rows).toBe(6);
    expect((await countReadings([bad.id])).rows).toBe(0);
    const rows = await rejectionsOf(bad.id);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ source: "mqtt", topic: `wormward/${bad.code}/readings`, excerpt: "[...]", farm_id: bad.farmId });
    expect(rows[0]!.reason).toMatch(/^store-failed: .*pressure/);
  });

  it("announces new readings on the readings channel once they are visible, and not repeats", async () => {
    const p = fleet[0]!;
    const heard: { probeIds: unknown; visible: number }[] = [];
    const listener = await pool().connect();
    try {
      listener.on("notification", (n) => {
        if (n.channel !== READINGS_CHANNEL) return;
        // Counted from another connection: what any rule runner would see on hearing it.
        void db()
          .execute<{ n: number }>(sql`select count(*)::int as n from readings where probe_id = ${p.id} and ts = ${new Date(t0 + 5000 * 1000).toISOString()}`)
          .then((r) => heard.push({ probeIds: JSON.parse(n.payload ?? "null"), visible: r.rows[0]!.n }));
      });
      await listener.query(`listen ${READINGS_CHANNEL}`);
      writer = createWriter({ db: db(), batch: { maxWaitMs: 10 } });
      await writer.submit(job(p, temps(p, 1, 5000)));
      await waitFor(
        "the announcement",
        async () => heard.length,
        (n) => n === 1,
        5000,
      );
      expect(heard).toEqual([{ probeIds: [p.id], visible: 1 }]);
      await writer.submit(job(p, temps(p, 1, 5000)));
      await new Promise((r) => setTimeout(r, 200));
      expect(heard).toHaveLength(1);
    } finally {
      await listener.query("unlisten *");
      listener.release();
    }
  });

  it("starts storing a lone message at once when it is idle, without a timer", async () => {
    const p = more[0]!;
    const sent: number[] = [];
    writer = createWriter({ db: doorDb(async (n) => void sent.push(n)) });
    const done = writer.submit(job(p, temps(p, 1)));
    await turns(2);
    expect(sent).toEqual([1]);
    await done;
    expect((await countReadings([p.id])).rows).toBe(1);
  });

  it("stores a second batch while the first is still committing, and acknowledges them in order", async () => {
    const [a, b] = [more[1]!, more[2]!];
    let open!: () => void;
    const gate = new Promise<void>((r) => (open = r));
    writer = createWriter({ db: doorDb((n) => (n === 1 ? gate : Promise.resolve())) });
    const acked: string[] = [];
    const first = writer.submit(job(a, temps(a, 2))).then(() => acked.push("first"));
    await turns(2); // the first batch is on its way and held at the door
    const second = writer.submit(job(b, temps(b, 2))).then(() => acked.push("second"));
    // The second batch commits while the first is held: its rows are there, its PUBACK is not.
    await waitFor(
      "the second batch's commit",
      () => countReadings([b.id]),
      (c) => c.rows === 2,
      5000,
    );
    await turns(5);
    expect(acked).toEqual([]);
    expect((await countReadings([a.id])).rows).toBe(0);
    open();
    await Promise.all([first, second]);
    expect(acked).toEqual(["first", "second"]);
    expect(await countReadings([a.id])).toEqual({ rows: 2, distinct: 2, rolled: 2 });
    expect(writer.stats()).toMatchObject({ batches: 2, rows: 4 });
  });

  it("acknowledges nothing while its commit fails, and stores it once when the server is back", async () => {
    const p = more[3]!;
    let down = true;
    writer = createWriter({ db: doorDb(async () => (down ? Promise.reject(serverGone()) : undefined)), retry: { minMs: 20, maxMs: 20 } });
    let acked = false;
    const done = writer.submit(job(p, temps(p, 3))).then(() => (acked = true));
    await waitFor(
      "a few failed tries",
      async () => writer!.stats().retries,
      (n) => n >= 3,
      5000,
    );
    expect(acked).toBe(false);
    expect((await countReadings([p.id])).rows).toBe(0);
    down = false;
    await done;
    expect(await countReadings([p.id])).toEqual({ rows: 3, distinct: 3, rolled: 3 });
  });

  it("acknowledges no batch behind one that is never stored, and refuses them all at shutdown", async () => {
    const [a, b] = (await createProbes(2)) as [TestProbe, TestProbe];
    // Only the first batch fails; the second commits, yet must not be acknowledged ahead of it.
    writer = createWriter({
      db: doorDb(async (n) => (n === 1 || n >= 3 ? Promise.reject(serverGone()) : undefined)),
      retry: { minMs: 20, maxMs: 20 },
    });
    const outcomes: string[] = [];
    const first = writer.submit(job(a, temps(a, 1, 900))).then(
      () => outcomes.push("first acked"),
      () => outcomes.push("first refused"),
    );
    await turns(2);
    const second = writer.submit(job(b, temps(b, 1, 900))).then(
      () => outcomes.push("second acked"),
      () => outcomes.push("second refused"),
    );
    await waitFor(
      "the second batch's commit",
      async () => (await countReadings([b.id])).rows,
      (n) => n === 1,
      5000,
    );
    await new Promise((r) => setTimeout(r, 100));
    expect(outcomes).toEqual([]);
    await writer.close(50);
    await Promise.all([first, second]);
    expect(outcomes).toEqual(["first refused", "second acked"]);
    expect((await countReadings([a.id])).rows).toBe(0);
  });
});
