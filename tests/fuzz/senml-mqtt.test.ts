// SenML over the real network path: a real MQTT client publishes fuzzed packs at QoS 1 to the real
// ingest service (ingest/service.ts) over TCP, which stores into this worker's PostgreSQL. Each PUBACK
// comes after the commit, so the counts can be read at once. The bulk of cases runs in process:
// senml-validate.test.ts.
import fc from "fast-check";
import type { MqttClient } from "mqtt";
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { startIngest, type Ingest } from "@/ingest/service";
import { DEFAULT_LIMITS } from "@/lib/domain/telemetry";
import { connectProbe, createProbes, tempPack, type TestProbe } from "../integration/ingest/helpers";
import { count, printTally, runs } from "./hostile";
import { buildPack, clockFrom, expectedOutcome, mixedPack, wholeBad, type BuiltPack } from "./senml-packs";

let ingest: Ingest;
let fleet: TestProbe[];
let client: MqttClient;
const clock = clockFrom(Math.floor(Date.now() / 1000));

beforeAll(async () => {
  fleet = await createProbes(2);
  ingest = await startIngest({ port: 0, batch: { maxWaitMs: 5 } });
  client = await connectProbe(ingest.port, fleet[0]!);
});
afterAll(async () => {
  await client?.endAsync();
  await ingest?.close();
  printTally("senml-mqtt");
});

/** Readings stored and records refused (rejected_messages.records summed) for one probe. */
async function tallyOf(probeId: number): Promise<{ stored: number; refused: number }> {
  const r = await db().execute<{ stored: number; refused: number }>(sql`
    select (select count(*)::int from readings where probe_id = ${probeId}) as stored,
           (select coalesce(sum(records), 0)::int from rejected_messages where probe_id = ${probeId}) as refused`);
  return r.rows[0]!;
}

const message = fc.oneof(
  { weight: 4, arbitrary: mixedPack().map((spec) => ({ spec, whole: null })) },
  { weight: 1, arbitrary: wholeBad.map((whole) => ({ spec: null, whole })) },
);

describe("SenML over MQTT (real broker and client, in PostgreSQL)", () => {
  it("every message is acknowledged, its good records stored and each bad one recorded with a reason", async () => {
    const probe = fleet[0]!;
    const topic = `wormward/${probe.code}/readings`;
    await fc.assert(
      fc.asyncProperty(message, async ({ spec, whole }) => {
        count("senml-mqtt over the network");
        let pack: BuiltPack | null = null;
        let payload: Buffer;
        if (spec) {
          pack = buildPack(probe.code, spec, clock);
          payload = Buffer.from(JSON.stringify(pack.json));
        } else payload = whole!.payload;
        const before = await tallyOf(probe.id);
        await client.publishAsync(topic, payload, { qos: 1 });
        const after = await tallyOf(probe.id);
        const want = expectedOutcome(payload, pack, DEFAULT_LIMITS.maxBytes);
        expect({ stored: after.stored - before.stored, refused: after.refused - before.refused }).toEqual(want);
        expect(client.connected).toBe(true);
      }),
      runs(150, 11),
    );
    // Every refusal row says why in readable words, and the ingest still takes a good pack from a new connection.
    const rows = await db().execute<{ reason: string }>(sql`select reason from rejected_messages where probe_id = ${probe.id}`);
    for (const r of rows.rows) expect(r.reason).toMatch(/^[a-z-]+: \S/);
    const other = await connectProbe(ingest.port, fleet[1]!);
    await other.publishAsync(`wormward/${fleet[1]!.code}/readings`, tempPack(fleet[1]!.code, clock.next(), 21), { qos: 1 });
    await other.endAsync();
    expect((await tallyOf(fleet[1]!.id)).stored).toBe(1);
  });

  it("payloads over the cap, with NUL bytes or deeply nested, are refused and the connection stays", async () => {
    const probe = fleet[0]!;
    const topic = `wormward/${probe.code}/readings`;
    const cases: Buffer[] = [
      Buffer.alloc(DEFAULT_LIMITS.maxBytes + 100, 0x20), // read and refused for its size
      Buffer.alloc(DEFAULT_LIMITS.maxBytes * 3, 0x5b), // read past by the frame guard
      Buffer.alloc(4096, 0), // NUL bytes only
      Buffer.from(`${"[".repeat(8000)}${"]".repeat(8000)}`), // nested 8,000 deep (16 KB, under the cap)
    ];
    for (const payload of cases) {
      count("senml-mqtt over the network");
      const before = await tallyOf(probe.id);
      await client.publishAsync(topic, payload, { qos: 1 });
      const after = await tallyOf(probe.id);
      expect(after.stored - before.stored).toBe(0);
      expect(after.refused - before.refused).toBe(1);
      expect(client.connected).toBe(true);
    }
  });
});
