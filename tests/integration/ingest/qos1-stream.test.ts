// Many probes publishing QoS 1 at once, with repeats mixed in: every distinct reading is stored
// once, and the hourly rollups count each stored reading once.
import { sql } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { startIngest, type Ingest } from "@/ingest/service";
import { connectProbe, countReadings, createProbes, tempPack, type TestProbe } from "./helpers";

const PROBES = 20;
const PER_PROBE = 500;
const REPEATS = 50; // of each probe's 500 messages, 50 repeat an earlier one

let ingest: Ingest;
let fleet: TestProbe[];
const clients: MqttClient[] = [];

beforeAll(async () => {
  fleet = await createProbes(PROBES);
  ingest = await startIngest({ port: 0 });
});
afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync()));
  await ingest.close();
});

/** Deterministic pseudo-random numbers, so a failure can be replayed. */
function rng(seed: number) {
  let s = seed >>> 0;
  return () => (s = (s * 1664525 + 1013904223) >>> 0) / 2 ** 32;
}

describe("a QoS 1 stream from 20 probes", () => {
  it("10,000 messages with repeats give exactly the distinct readings, and rollups count each once", async () => {
    const start = Math.floor(Date.now() / 1000) - 60;
    const expected = new Map<string, number>();
    const plans = fleet.map((p, i) => {
      const rand = rng(1000 + i);
      const sent: { t: number; v: number }[] = [];
      const msgs: string[] = [];
      for (let k = 0; k < PER_PROBE; k++) {
        // Repeats land at random places in the stream, each an exact copy of an earlier message.
        const repeat = sent.length > 0 && msgs.length - sent.length < REPEATS && rand() < REPEATS / PER_PROBE + 0.02;
        const m = repeat ? sent[Math.floor(rand() * sent.length)]! : { t: start - sent.length * 15, v: Math.round((18 + rand() * 10) * 100) / 100 };
        if (!repeat) {
          sent.push(m);
          expected.set(`${p.id}/${m.t}`, m.v);
        }
        msgs.push(tempPack(p.code, m.t, m.v));
      }
      return { p, msgs };
    });
    const total = plans.reduce((n, x) => n + x.msgs.length, 0);
    expect(total).toBe(PROBES * PER_PROBE);
    expect(expected.size).toBeLessThan(total);

    for (const { p } of plans) clients.push(await connectProbe(ingest.port, p));
    await Promise.all(plans.map(({ p, msgs }, i) => Promise.all(msgs.map((m) => clients[i]!.publishAsync(`wormward/${p.code}/readings`, m, { qos: 1 })))));

    // Every PUBACK is in, so every row must already be committed.
    const ids = fleet.map((p) => p.id);
    const counts = await countReadings(ids);
    expect(counts).toEqual({ rows: expected.size, distinct: expected.size, rolled: expected.size });

    const stored = await db().execute<{ probe_id: number; ts: Date; value: number }>(
      sql`select probe_id, ts, value from readings where probe_id = any(${sql.param(ids)}::int[]) and metric = 'temperature'`,
    );
    const got = new Map(stored.rows.map((r) => [`${r.probe_id}/${new Date(r.ts).getTime() / 1000}`, r.value]));
    expect(got).toEqual(expected);

    // The rollups kept by the writer equal a fresh aggregate of what is stored.
    const drift = await db().execute<{ n: number }>(sql`
      select count(*)::int as n from (
        select probe_id, metric, date_trunc('hour', ts, 'UTC') as hour, min(value) as min, max(value) as max, sum(value) as sum, count(*)::int as count
        from readings where probe_id = any(${sql.param(ids)}::int[]) group by 1, 2, 3
      ) a full join (select * from reading_rollups where probe_id = any(${sql.param(ids)}::int[])) r using (probe_id, metric, hour)
      where a.count is distinct from r.count or a.min is distinct from r.min or a.max is distinct from r.max
         or abs(a.sum - r.sum) > 1e-6 or a.sum is null or r.sum is null`);
    expect(drift.rows[0]!.n).toBe(0);
  });
});
