// A probe publishes only to its own readings and presence topics and subscribes only to its own
// for-probe topic (lib/domain/vocabulary.ts probeTopics); the MQTT 3.1.1 rules the scheme relies on
// are checked here, each with its clause. The retired names (/up, /status, /down) are unknown topics.
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { probes } from "@/db/schema";
import { startIngest, type Ingest } from "@/ingest/service";
import { probeTopics } from "@/lib/domain/vocabulary";
import { connectProbe, countReadings, createProbes, rejectionsOf, tempPack, type TestProbe } from "./helpers";

let ingest: Ingest;
let a: TestProbe;
let b: TestProbe;
const clients: MqttClient[] = [];

beforeAll(async () => {
  [a, b] = (await createProbes(2)) as [TestProbe, TestProbe];
  // probeTtlMs 0: every publish re-reads the probe row, so archiving takes effect at once.
  ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 }, probeTtlMs: 0 });
});
afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true)));
  await ingest.close();
});

async function connect(p: TestProbe, extra = {}) {
  const c = await connectProbe(ingest.port, p, extra);
  c.on("error", () => {}); // refusals below close the connection on purpose
  clients.push(c);
  return c;
}

/** Publishes at QoS 1 and reports whether the broker closed the connection instead of acknowledging. */
async function publishIsRefused(c: MqttClient, topic: string, payload: string): Promise<boolean> {
  const closed = new Promise<boolean>((resolve) => c.once("close", () => resolve(true)));
  const acked = c.publishAsync(topic, payload, { qos: 1 }).then(
    () => false,
    () => true,
  );
  return Promise.race([closed, acked]);
}

describe("subscriptions", () => {
  it("grants a probe its own for-probe topic, wormward/<code>/for-probe", async () => {
    const c = await connect(a);
    expect(probeTopics(a.code).forProbe).toBe(`wormward/${a.code}/for-probe`);
    const granted = await c.subscribeAsync(probeTopics(a.code).forProbe, { qos: 1 });
    expect(granted.map((g) => g.qos)).toEqual([1]);
  });

  // Each refusal is a SUBACK with return code 0x80, Failure (MQTT 3.1.1 §3.9.3).
  it.each([
    ["#", "§4.7.1-2: '#' alone matches every topic, other probes' included"],
    ["wormward/+/for-probe", "§4.7.1-3: '+' matches any one level, so every probe's for-probe topic"],
    ["wormward/#", "§4.7.1-2: a trailing '#' matches the parent and every level below"],
    ["+/+/for-probe", "§4.7.1-3: '+' in several levels"],
    ["OTHER", "another probe's for-probe topic"],
    ["OLD", "its own retired command topic wormward/<code>/down, now an unknown topic"],
    ["UPPER", "§4.7.3: topics are case-sensitive, so a differently cased code is another topic"],
    ["$SYS/#", "§4.7.2-1: '$SYS/#' does match broker topics, which are not for probes"],
  ])("refuses a subscription to %s (%s)", async (filter) => {
    const c = await connect(a);
    const topic =
      filter === "OTHER"
        ? probeTopics(b.code).forProbe
        : filter === "UPPER"
          ? probeTopics(a.code.toUpperCase()).forProbe
          : filter === "OLD"
            ? `wormward/${a.code}/down`
            : filter;
    await expect(c.subscribeAsync(topic, { qos: 1 })).rejects.toMatchObject({ packet: { granted: [0x80] } });
    expect(c.connected).toBe(true);
  });
});

describe("publications", () => {
  it.each([
    ["another probe's readings topic", () => probeTopics(b.code).readings],
    ["another probe's presence topic", () => probeTopics(b.code).presence],
    ["its own for-probe topic", () => probeTopics(a.code).forProbe],
    ["a differently cased own topic (§4.7.3: case-sensitive)", () => probeTopics(a.code.toUpperCase()).readings],
    ["an own topic with a trailing '/' (§4.7.3: a distinct topic)", () => `${probeTopics(a.code).readings}/`],
    ["its retired readings topic wormward/<code>/up, now an unknown topic", () => `wormward/${a.code}/up`],
    ["its retired presence topic wormward/<code>/status, now an unknown topic", () => `wormward/${a.code}/status`],
    ["a $SYS topic (aedes' own refusal, kept)", () => "$SYS/anything"],
  ])("closes the connection on a publish to %s and stores nothing", async (_what, topic) => {
    const before = await countReadings([a.id, b.id]);
    const c = await connect(a);
    expect(await publishIsRefused(c, topic(), tempPack(a.code, Math.floor(Date.now() / 1000), 20))).toBe(true);
    expect(await countReadings([a.id, b.id])).toEqual(before);
    // Nothing about the readings is refused; a topic not its own is noted for the probe's page only
    // (at most once a minute, so only the first of these cases adds a row).
    expect((await rejectionsOf(a.id)).filter((x) => !x.reason.startsWith("wrong-topic"))).toEqual([]);
  });

  it("notes a publish to a topic not its own on the probe's page, with the topic", async () => {
    await db().execute(sql`delete from rejected_messages where probe_id = ${a.id}`);
    const c = await connect(a);
    expect(await publishIsRefused(c, `wormward/${a.code}/up`, tempPack(a.code, Math.floor(Date.now() / 1000), 20))).toBe(true);
    await expect
      .poll(async () => (await rejectionsOf(a.id)).map((x) => [x.source, x.reason.split(":")[0], x.topic]))
      .toEqual([["mqtt", "wrong-topic", `wormward/${a.code}/up`]]);
  });

  it("refuses a wildcard in a topic name (§4.7.1-1)", async () => {
    const c = await connect(a);
    expect(await publishIsRefused(c, `wormward/+/readings`, tempPack(a.code, Math.floor(Date.now() / 1000), 20))).toBe(true);
  });

  it("accepts and stores a reading on the probe's own readings topic, wormward/<code>/readings", async () => {
    const before = await countReadings([a.id]);
    const c = await connect(a);
    expect(probeTopics(a.code).readings).toBe(`wormward/${a.code}/readings`);
    expect(await publishIsRefused(c, probeTopics(a.code).readings, tempPack(a.code, Math.floor(Date.now() / 1000) - 5, 20))).toBe(false);
    expect((await countReadings([a.id])).rows).toBe(before.rows + 1);
  });
});

describe("connections", () => {
  it("refuses a client id that belongs to another probe (§3.2.2.3, return code 2)", async () => {
    await expect(connectProbe(ingest.port, a, { clientId: b.code })).rejects.toMatchObject({ code: 2 });
  });

  it("accepts <code>:<suffix> and an empty id with a clean session (§3.1.3-6)", async () => {
    const c1 = await connect(a, { clientId: `${a.code}:bench-1` });
    const c2 = await connect(a, { clientId: "", clean: true });
    expect(c1.connected && c2.connected).toBe(true);
  });

  it("refuses an archived probe at connect, and cuts off its publishes once archived", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const c = await connect(p);
    await db().update(probes).set({ archivedAt: new Date() }).where(eq(probes.id, p.id));
    expect(await publishIsRefused(c, probeTopics(p.code).readings, tempPack(p.code, Math.floor(Date.now() / 1000), 20))).toBe(true);
    expect((await countReadings([p.id])).rows).toBe(0);
    await expect(connectProbe(ingest.port, p)).rejects.toMatchObject({ code: 4 });
  });
});
