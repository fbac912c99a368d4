// Every reason to refuse what a probe sent is recorded with probe, topic, time, reason and the first
// bytes; the refused message is still acknowledged (so the probe stops resending it), and good
// records travelling with bad ones are stored.
import { eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { probes } from "@/db/schema";
import { startIngest, type Ingest } from "@/ingest/service";
import { probeBaseName } from "@/lib/domain/metrics";
import { connectProbe, countReadings, createProbes, rejectionsOf, type TestProbe } from "./helpers";

let ingest: Ingest;
let fleet: TestProbe[];
const clients: MqttClient[] = [];

beforeAll(async () => {
  fleet = await createProbes(13);
  ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 } });
});
afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync()));
  await ingest.close();
});

const now = () => Math.floor(Date.now() / 1000);

/** Publishes `payload` at QoS 1 from probe `i` and resolves on its PUBACK. */
async function send(i: number, payload: string | Buffer) {
  const p = fleet[i]!;
  const c = await connectProbe(ingest.port, p);
  clients.push(c);
  await c.publishAsync(`wormward/${p.code}/readings`, payload, { qos: 1 });
  expect(c.connected).toBe(true);
  return p;
}

describe("rejected messages", () => {
  const cases: [string, number, () => string | Buffer, RegExp][] = [
    ["malformed JSON", 0, () => '[{"bn":"x",', /^malformed-json: /],
    ["malformed SenML (not an array of records)", 1, () => JSON.stringify({ bn: "urn:dev:wormward:x:", v: 1 }), /^malformed-senml: .*RFC 8428 §5/],
    ["an unknown metric", 2, () => JSON.stringify([{ bn: probeBaseName(fleet[2]!.code), bt: now(), n: "ph", v: 7 }]), /^unknown-metric: .*"ph"/],
    [
      "a value outside the physical range",
      3,
      () => JSON.stringify([{ bn: probeBaseName(fleet[3]!.code), bt: now(), n: "temp", u: "Cel", v: 131 }]),
      /^out-of-range: .*131/,
    ],
    ["a sensor error code", 4, () => JSON.stringify([{ bn: probeBaseName(fleet[4]!.code), bt: now(), n: "temp", u: "Cel", v: -127 }]), /^sensor-error: .*-127/],
    [
      "a time more than 5 minutes ahead",
      5,
      () => JSON.stringify([{ bn: probeBaseName(fleet[5]!.code), bt: now() + 6 * 60, n: "temp", u: "Cel", v: 20 }]),
      /^too-far-ahead: /,
    ],
    [
      "a time older than 30 days",
      6,
      () => JSON.stringify([{ bn: probeBaseName(fleet[6]!.code), bt: now() - 31 * 86_400, n: "temp", u: "Cel", v: 20 }]),
      /^too-old: /,
    ],
    [
      "a payload over 16 KiB",
      7,
      () => JSON.stringify([{ bn: probeBaseName(fleet[7]!.code), bt: now(), n: "temp", u: "Cel", v: 20 }]).padEnd(16 * 1024 + 1, " "),
      /^too-large: payload is 16385 bytes/,
    ],
  ];

  for (const [what, i, payload, reason] of cases) {
    it(`records ${what}, acknowledges it and stores nothing from it`, async () => {
      const body = payload();
      const p = await send(i, body);
      const rows = await rejectionsOf(p.id);
      expect(rows).toHaveLength(1);
      expect(rows[0]).toMatchObject({ source: "mqtt", topic: `wormward/${p.code}/readings`, farm_id: p.farmId });
      expect(rows[0]!.reason).toMatch(reason);
      expect(rows[0]!.excerpt).toBe(Buffer.from(body).subarray(0, 200).toString("utf8"));
      expect((await countReadings([p.id])).rows).toBe(0);
      // The probe was still seen, even though what it sent was refused.
      const [row] = await db().select().from(probes).where(eq(probes.id, p.id));
      expect(row?.lastSeenAt).not.toBeNull();
    });
  }

  it("stores the good records of a message that also carries a bad one", async () => {
    const p = fleet[8]!;
    const t = now() - 10;
    await send(
      8,
      JSON.stringify([
        { bn: probeBaseName(p.code), bt: t, n: "temp", u: "Cel", v: 22.5 },
        { n: "moisture", u: "/100", v: 140 },
        { n: "nh3", u: "ppm", v: 4 },
      ]),
    );
    expect(await countReadings([p.id])).toEqual({ rows: 2, distinct: 2, rolled: 2 });
    const rows = await rejectionsOf(p.id);
    expect(rows.map((r) => r.reason)).toEqual([expect.stringMatching(/^out-of-range: .*moisture = 140/)]);
  });

  it("a SenML time outside the date range is one refused record and the rest of the pack is stored", async () => {
    // "t": 1e13 and "bt": 1e300 are past what a JavaScript Date holds (ECMA-262 §21.4.1.22).
    const p = fleet[10]!;
    const t = now() - 10;
    await send(
      10,
      JSON.stringify([
        { bn: probeBaseName(p.code), bt: t, n: "temp", u: "Cel", v: 21 },
        { n: "temp", u: "Cel", v: 22, t: 1e13 },
        { bt: 1e300, n: "moisture", u: "/100", v: 70 },
        { bt: t, n: "moisture", u: "/100", v: 71 },
      ]),
    );
    expect(await countReadings([p.id])).toEqual({ rows: 2, distinct: 2, rolled: 2 });
    const rows = await rejectionsOf(p.id);
    expect(rows).toHaveLength(1);
    expect(rows[0]!.records).toBe(2);
    expect(rows[0]!.reason.split("\n")).toEqual([
      expect.stringMatching(/^too-far-ahead: .*:temp at t=\d+ s is more than 5 min ahead/),
      expect.stringMatching(/^too-far-ahead: .*:moisture at t=1e\+300 s/),
    ]);
  });

  it("a pack of 8,190 bad records writes one rejection row with its count", async () => {
    const p = fleet[11]!;
    // 8,190 numbers where records belong (RFC 8428 §5: a record is a JSON object): 16,381 bytes.
    const body = `[${Array(8190).fill(1).join(",")}]`;
    expect(Buffer.byteLength(body)).toBeLessThanOrEqual(16 * 1024);
    await send(11, body);
    const rows = await rejectionsOf(p.id);
    expect(rows).toHaveLength(1);
    expect(rows[0]!.records).toBe(8190);
    expect(rows[0]!.excerpt).toBe(body.slice(0, 200));
    const lines = rows[0]!.reason.split("\n");
    expect(lines[0]).toBe("malformed-senml: record 0: a record must be a JSON object (RFC 8428 §5)");
    expect(lines).toHaveLength(6);
    expect(lines[5]).toBe("and 8185 more records refused");
    expect((await countReadings([p.id])).rows).toBe(0);
  });

  it("records nothing for a message that is entirely good", async () => {
    const p = fleet[9]!;
    await send(9, JSON.stringify([{ bn: probeBaseName(p.code), bt: now(), n: "temp", u: "Cel", v: 19 }]));
    expect(await rejectionsOf(p.id)).toEqual([]);
    expect((await countReadings([p.id])).rows).toBe(1);
  });
});
