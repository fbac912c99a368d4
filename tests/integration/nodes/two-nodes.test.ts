// Two ingest nodes (two `ingest/main.ts` processes) sharing sessions, fan-out and presence through
// one Redis, over one database: a probe on node A is connected as far as node B and the pages can
// tell; a probe moving to B keeps its session and what it had in flight; readings meeting a rule
// through both nodes raise one alert and send it once.
import { Aedes } from "aedes";
import { eq, sql } from "drizzle-orm";
import mqtt, { type MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { alertEvents, alerts, memberships, probes, users } from "@/db/schema";
import { createBrokerBackends, type BrokerBackends } from "@/ingest/broker-backends";
import { startHaproxy, stopHaproxy } from "@/lib/stack/haproxy";
import { probeTopics } from "@/lib/domain/vocabulary";
import { connectProbe, countReadings, createProbes, freePort, tempPack, waitFor, type TestProbe } from "../ingest/helpers";
import { startNode, startTestRedis, stopNode, type Node } from "./helpers";

let redis: Awaited<ReturnType<typeof startTestRedis>>;
let a: Node;
let b: Node;
// The registry as any other node reads it (this process joins as a third node that holds no probe).
let view: BrokerBackends;
const clients: MqttClient[] = [];

beforeAll(async () => {
  redis = await startTestRedis("nodes");
  const [pa, pb] = [await freePort(), await freePort()];
  [a, b] = await Promise.all([startNode(pa, redis.url), startNode(pb, redis.url)]);
  view = await createBrokerBackends({ redisUrl: redis.url, nodeId: "test-view" });
});
afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => {})));
  await Promise.all([a, b].filter(Boolean).map((n) => stopNode(n)));
  await view?.close();
  redis?.stop();
});

const onlineInDb = async (p: TestProbe) => (await db().select({ online: probes.online }).from(probes).where(eq(probes.id, p.id)))[0]?.online;
const becomes = (p: TestProbe, want: boolean, timeoutMs = 15_000) =>
  waitFor(
    `${p.code} online=${want} in probes.online`,
    () => onlineInDb(p),
    (v) => v === want,
    timeoutMs,
  );
async function connect(node: Node, p: TestProbe, extra = {}) {
  const c = await connectProbe(node.port, p, extra);
  c.on("error", () => {});
  clients.push(c);
  return c;
}

describe("presence across nodes", () => {
  it("a probe connected to node A is connected as node B and the pages see it; it is gone only when its last connection on any node closes", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const onA = await connect(a, p);
    expect(await waitFor("registry", () => view.presence.isConnected(p.code), Boolean, 10_000)).toBe(true);
    await becomes(p, true);

    // A second connection of the same probe on node B, then A's closes: node A alone would call it
    // gone; the registry knows B still holds one.
    const onB = await connect(b, p, { clientId: `${p.code}:second` });
    await waitFor(
      "two connections",
      () => view.presence.connectedCodes(),
      (codes) => codes.includes(p.code),
      10_000,
    );
    await onA.endAsync();
    // Longer than a presence sync (5 s): the column must not flip to false and stay there.
    await new Promise((r) => setTimeout(r, 6_000));
    expect(await view.presence.isConnected(p.code)).toBe(true);
    expect(await onlineInDb(p)).toBe(true);

    await onB.endAsync();
    await becomes(p, false);
    expect(await view.presence.isConnected(p.code)).toBe(false);
  });

  it("a node killed with its probes on it does not leave them connected", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    await connect(a, p);
    await becomes(p, true);
    await stopNode(a, "SIGKILL");
    // Its key in Redis lapses after 15 s; node B's next sweep clears its connections and the column.
    await becomes(p, false, 40_000);
    expect(await view.presence.isConnected(p.code)).toBe(false);
    a = await startNode(a.port, redis.url);
  }, 60_000);
});

describe("a probe moving from node A to node B", () => {
  it("keeps its session: its subscription and a QoS 1 message queued for it while it was away", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const first = await connect(a, p, { clean: false });
    await first.subscribeAsync(probeTopics(p.code).forProbe, { qos: 1 });
    await first.endAsync();

    // Nothing in the product writes to a probe yet, so a broker in this process, on the same Redis,
    // publishes the message (the operator's side); the probe is connected to no node meanwhile.
    const operator = await Aedes.createBroker({ ...view.aedes, id: "test-operator" });
    await new Promise<void>((resolve, reject) =>
      operator.publish({ cmd: "publish", topic: probeTopics(p.code).forProbe, payload: Buffer.from("calibrate"), qos: 1, retain: false, dup: false }, (err) =>
        err ? reject(err) : resolve(),
      ),
    );
    await new Promise<void>((r) => operator.close(() => r()));

    const second = mqtt.connect(`mqtt://127.0.0.1:${b.port}`, {
      clientId: p.code,
      username: p.code,
      password: p.token,
      protocolVersion: 4,
      clean: false,
      reconnectPeriod: 0,
    });
    clients.push(second);
    second.on("error", () => {});
    // Both listeners before either arrives: the queued PUBLISH can come in the same read as the
    // CONNACK, and MQTT.js then emits it before an awaited "connect" would let a later listener on.
    const acked = new Promise<{ sessionPresent: boolean }>((resolve) => second.once("connect", resolve));
    const received = new Promise<{ topic: string; payload: string; qos: number }>((resolve) =>
      second.on("message", (topic, payload, packet) => resolve({ topic, payload: payload.toString(), qos: packet.qos })),
    );
    const ack = await acked;
    const msg = await received;
    expect(ack.sessionPresent).toBe(true);
    expect(msg).toEqual({ topic: probeTopics(p.code).forProbe, payload: "calibrate", qos: 1 });
  });

  it("kill -9 of node A mid-stream: the probe reconnects to B with its session, resends what A had not acknowledged, and every reading is stored once", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    // MQTT.js cycles through `servers` on each reconnect: A first, then B (A is gone by then).
    const c = await connectProbe(a.port, p, {
      clean: false,
      reconnectPeriod: 200,
      connectTimeout: 2000,
      servers: [
        { host: "127.0.0.1", port: a.port },
        { host: "127.0.0.1", port: b.port },
      ],
    });
    c.on("error", () => {});
    clients.push(c);
    await c.subscribeAsync(probeTopics(p.code).forProbe, { qos: 1 });
    const connacks: boolean[] = [];
    c.on("connect", (ack) => connacks.push(ack.sessionPresent));

    const MESSAGES = 1500;
    const WINDOW = 100;
    const start = Math.floor(Date.now() / 1000) - 3 * 3600;
    let acked = 0;
    let inFlightAtKill = -1;
    const inFlight = new Set<Promise<void>>();
    for (let i = 0; i < MESSAGES; i++) {
      while (inFlight.size >= WINDOW) await Promise.race(inFlight);
      const pr: Promise<void> = c
        .publishAsync(probeTopics(p.code).readings, tempPack(p.code, start + i, 18 + (i % 50) / 10), { qos: 1 })
        .then(() => void acked++)
        .finally(() => inFlight.delete(pr));
      inFlight.add(pr);
      if (inFlightAtKill < 0 && acked >= MESSAGES / 3) {
        inFlightAtKill = inFlight.size;
        await stopNode(a, "SIGKILL");
      }
    }
    await Promise.all(inFlight);

    expect(inFlightAtKill).toBeGreaterThan(0);
    expect(acked).toBe(MESSAGES);
    // The reconnection went to B (A was dead) and B found the session A had made.
    expect(connacks).toEqual([true]);
    const counts = await waitFor(
      "every reading",
      () => countReadings([p.id]),
      (v) => v.rows >= MESSAGES,
      15_000,
    );
    expect(counts).toEqual({ rows: MESSAGES, distinct: MESSAGES, rolled: MESSAGES });
    a = await startNode(a.port, redis.url);
  }, 90_000);
});

describe("rules across nodes", () => {
  it("readings meeting the heat rule through both nodes raise one alert and send it once", async () => {
    const [p0, p1] = (await createProbes(2)) as [TestProbe, TestProbe];
    const [u] = await db()
      .insert(users)
      .values({ email: `nodes-${p0.code}@example.org`, name: "Keeper", passwordHash: "x" })
      .returning();
    await db().insert(memberships).values({ userId: u!.id, farmId: p0.farmId, role: "keeper" });
    const [c0, c1] = [await connect(a, p0), await connect(b, p1)];
    const now = Math.floor(Date.now() / 1000);
    // 33 °C for the last 14 minutes from two probes of one zone, one through each node.
    await Promise.all(
      Array.from({ length: 15 }, (_, i) => [
        c0.publishAsync(probeTopics(p0.code).readings, tempPack(p0.code, now - (14 - i) * 60, 33), { qos: 1 }),
        c1.publishAsync(probeTopics(p1.code).readings, tempPack(p1.code, now - (14 - i) * 60 - 30, 33), { qos: 1 }),
      ]).flat(),
    );
    const heat = () =>
      db()
        .select()
        .from(alerts)
        .where(sql`${alerts.zoneId} = ${p0.zoneId} and ${alerts.kind} = 'heat'`);
    const [alert] = await waitFor("the heat alert", heat, (rows) => rows.length > 0, 20_000);
    const events = () => db().select().from(alertEvents).where(eq(alertEvents.alertId, alert!.id));
    await waitFor("its e-mail", events, (ev) => ev.some((e) => e.type === "sent"), 20_000);
    // Both runners have heard every batch by now (coalesced 2 s); give them as long again.
    await new Promise((r) => setTimeout(r, 5_000));
    expect(await heat()).toHaveLength(1);
    const ev = await events();
    expect(ev.filter((e) => e.type === "raised")).toHaveLength(1);
    expect(ev.filter((e) => e.type === "sent" && e.channel === "email")).toHaveLength(1);
  }, 60_000);
});

describe("behind HAProxy", () => {
  it("a probe given one address stays reachable while each node in turn is killed and restarted", async () => {
    const name = `${inject("clusterName")}-haproxy-nodes`;
    const front = await freePort();
    await startHaproxy({
      name,
      port: front,
      backends: [
        { name: "a", port: a.port },
        { name: "b", port: b.port },
      ],
    });
    try {
      const [p] = (await createProbes(1)) as [TestProbe];
      const c = await connectProbe(front, p, { clean: false, reconnectPeriod: 300, connectTimeout: 2000 });
      c.on("error", () => {});
      clients.push(c);
      let reconnects = 0;
      c.on("connect", () => reconnects++);
      const t = Math.floor(Date.now() / 1000) - 3600;
      for (const [i, which] of (["a", "b"] as const).entries()) {
        const node = which === "a" ? a : b;
        await stopNode(node, "SIGKILL");
        // HAProxy's check (every 2 s, two misses) takes the dead node out; the probe's retries land on the other.
        await c.publishAsync(probeTopics(p.code).readings, tempPack(p.code, t + i, 20), { qos: 1 });
        const restarted = await startNode(node.port, redis.url);
        if (which === "a") a = restarted;
        else b = restarted;
      }
      // One of the two kills held the probe's connection, so it came back at least once.
      expect(reconnects).toBeGreaterThanOrEqual(1);
      expect((await countReadings([p.id])).rows).toBe(2);
      expect(await waitFor("registry", () => view.presence.isConnected(p.code), Boolean, 10_000)).toBe(true);
    } finally {
      stopHaproxy(name);
    }
  }, 120_000);
});
