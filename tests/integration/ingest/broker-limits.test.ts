// The broker refuses abuse before it costs memory: packets too large are cut off from their fixed
// header, an address's connect attempts and open connections are limited, a silent connection is
// closed, retained publishes are refused. Real broker (startIngest), real sockets, real PostgreSQL.
import net from "node:net";
import { connect, type MqttClient } from "mqtt";
import { afterEach, describe, expect, it } from "vitest";
import { startIngest, type Ingest, type IngestOptions } from "@/ingest/service";
import { connectPacket, varint } from "../../helpers/mqtt-bytes";
import { connectProbe, countReadings, createProbes, rejectionsOf, tempPack, waitFor, type TestProbe } from "./helpers";

const started: Ingest[] = [];
const sockets: net.Socket[] = [];
const clients: MqttClient[] = [];

afterEach(async () => {
  for (const s of sockets.splice(0)) s.destroy();
  await Promise.all(clients.splice(0).map((c) => c.endAsync(true).catch(() => {})));
  await Promise.all(started.splice(0).map((i) => i.close()));
});

async function broker(opts: Partial<IngestOptions> = {}) {
  const ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 }, ...opts });
  started.push(ingest);
  return ingest;
}

const nowS = () => Math.floor(Date.now() / 1000);

type Raw = { socket: net.Socket; opened: Promise<void>; closed: Promise<number>; received: () => Buffer; isClosed: () => boolean };

/** A plain TCP connection to the broker; `closed` resolves with the time it was closed. */
function raw(port: number): Raw {
  const socket = net.connect(port, "127.0.0.1");
  sockets.push(socket);
  const chunks: Buffer[] = [];
  let done = false;
  socket.on("data", (c: Buffer) => chunks.push(c));
  socket.on("error", () => {});
  const opened = new Promise<void>((r) => socket.once("connect", () => r()));
  const closed = new Promise<number>((r) =>
    socket.once("close", () => {
      done = true;
      r(Date.now());
    }),
  );
  return { socket, opened, closed, received: () => Buffer.concat(chunks), isClosed: () => done };
}

/** Sends a CONNECT with a wrong password; resolves with the CONNACK return code, or null when closed without one. */
async function badConnect(port: number, code: string): Promise<number | null> {
  const c = raw(port);
  await c.opened;
  c.socket.write(connectPacket(code, code, "not-the-token"));
  await c.closed;
  const got = c.received();
  // CONNACK: 0x20, length 2, flags, return code (MQTT 3.1.1 §3.2)
  return got.length >= 4 && got[0] === 0x20 ? got[3]! : null;
}

/** A real MQTT client's connection attempt: did it get a session, or was it closed first? */
function tryConnect(port: number, p: TestProbe): Promise<"connected" | "closed"> {
  const c = connect(`mqtt://127.0.0.1:${port}`, { clientId: p.code, username: p.code, password: p.token, protocolVersion: 4, reconnectPeriod: 0 });
  clients.push(c);
  c.on("error", () => {});
  return new Promise((r) => {
    c.once("connect", () => r("connected"));
    c.once("close", () => r("closed"));
  });
}

const within = <T>(p: Promise<T>, ms: number) => Promise.race([p, new Promise<"timeout">((r) => setTimeout(() => r("timeout"), ms))]);

describe("packet size", () => {
  it("a 1 MB MQTT packet from an unauthenticated client is cut off before it is buffered", async () => {
    // The connect timeout is far away, so a close now is the size cap's doing, not the timeout's.
    const ingest = await broker({ connectTimeoutMs: 60_000 });
    const c = raw(ingest.port);
    await c.opened;
    // A CONNECT announcing 1 MiB of body (§2.2.3), then only the first 1 KiB of it.
    const header = Buffer.concat([Buffer.from([0x10]), varint(1024 * 1024)]);
    c.socket.write(Buffer.concat([header, Buffer.alloc(1024, 0x41)]));
    const sentBytes = header.length + 1024;
    expect(await within(c.closed, 5_000)).not.toBe("timeout");
    expect(sentBytes).toBeLessThan(1100); // the other 1,047,552 bytes were never needed to decide
    expect(c.received()).toHaveLength(0); // no CONNACK: nothing of it was read as a CONNECT
    expect(ingest.stats().cutPackets).toBe(1);
  });

  it("a first packet that is not a CONNECT is cut off at its first byte", async () => {
    const ingest = await broker({ connectTimeoutMs: 60_000 });
    const c = raw(ingest.port);
    await c.opened;
    c.socket.write(Buffer.concat([Buffer.from([0x30]), varint(100)])); // PUBLISH header, §3.3.1
    expect(await within(c.closed, 5_000)).not.toBe("timeout");
  });

  it("a probe's 1 MB publish is read past without being kept, recorded as too large and acknowledged", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const ingest = await broker();
    const client = await connectProbe(ingest.port, p);
    clients.push(client);
    let closed = 0;
    client.on("close", () => closed++);
    const readings = `wormward/${p.code}/readings`;
    // The PUBACK comes (so the probe does not send it again), and the connection stays.
    await client.publishAsync(readings, Buffer.alloc(1024 * 1024, 0x20), { qos: 1 });
    const rows = await rejectionsOf(p.id);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ topic: readings, source: "mqtt" });
    expect(rows[0]!.reason).toMatch(/^too-large: a packet of 1048\d{3} bytes was read past; payloads of at most 16384 bytes are accepted/);
    await client.publishAsync(readings, tempPack(p.code, nowS(), 21), { qos: 1 });
    expect((await countReadings([p.id])).rows).toBe(1);
    expect(closed).toBe(0);
    expect(ingest.stats().cutPackets).toBe(0);
  });

  it("a probe's oversized packet that is not a PUBLISH closes its connection and is recorded", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const ingest = await broker();
    const client = await connectProbe(ingest.port, p);
    clients.push(client);
    const closed = new Promise<void>((r) => client.once("close", () => r()));
    client.subscribe(`wormward/${p.code}/for-probe/${"x".repeat(40_000)}`, { qos: 1 });
    expect(await within(closed, 5_000)).not.toBe("timeout");
    const rows = await waitFor(
      "the cut packet's record",
      () => rejectionsOf(p.id),
      (r) => r.length === 1,
      5_000,
    );
    expect(rows[0]!.reason).toMatch(/^too-large: a packet of 400\d\d bytes is over the 16896-byte cap; the connection was closed/);
    expect(ingest.stats().cutPackets).toBe(1);
  });

  it("a publish of 16 KiB of SenML still reaches the validator, which records it as too large", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const ingest = await broker();
    const client = await connectProbe(ingest.port, p);
    clients.push(client);
    await client.publishAsync(`wormward/${p.code}/readings`, tempPack(p.code, nowS(), 21).padEnd(16 * 1024 + 100, " "), { qos: 1 });
    expect(client.connected).toBe(true);
    expect((await rejectionsOf(p.id)).map((r) => r.reason)).toEqual([expect.stringMatching(/^too-large: payload is 16484 bytes/)]);
  });
});

describe("connections per address", () => {
  it("too many connect attempts from one address are refused", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const ingest = await broker({ connections: { attemptBurst: 5, attemptsPerMinute: 1 } });
    // Five bad CONNECTs are answered: CONNACK 4, bad user name or password (§3.2.2.3).
    for (let i = 0; i < 5; i++) expect(await badConnect(ingest.port, p.code)).toBe(4);
    // The sixth is closed unread, even with the right password.
    expect(await badConnect(ingest.port, p.code)).toBeNull();
    expect(await tryConnect(ingest.port, p)).toBe("closed");
    expect(ingest.stats().refusedConnections).toBe(2);
  });

  it("accepted connections give their attempt back, so probes behind one address can reconnect", async () => {
    const fleet = await createProbes(12);
    const ingest = await broker({ connections: { attemptBurst: 3, attemptsPerMinute: 1 } });
    for (const p of fleet) {
      const c = await connectProbe(ingest.port, p);
      await c.endAsync();
    }
    expect(ingest.stats().refusedConnections).toBe(0);
  });

  it("too many open connections from one address are refused", async () => {
    const fleet = await createProbes(3);
    const ingest = await broker({ connections: { maxPendingPerAddress: 5 }, connectTimeoutMs: 60_000 });
    // Probes whose CONNECT was accepted do not count as waiting: they share the address freely.
    for (const p of fleet) clients.push(await connectProbe(ingest.port, p));
    const idle = Array.from({ length: 5 }, () => raw(ingest.port));
    await Promise.all(idle.map((c) => c.opened));
    const sixth = raw(ingest.port);
    expect(await within(sixth.closed, 3_000)).not.toBe("timeout");
    expect(sixth.received()).toHaveLength(0);
    expect(idle.every((c) => !c.isClosed())).toBe(true);
    // One of the five goes; a new one may wait in its place.
    idle[0]!.socket.destroy();
    await idle[0]!.closed;
    await new Promise((r) => setTimeout(r, 100));
    const next = raw(ingest.port);
    await next.opened;
    expect(await within(next.closed, 500)).toBe("timeout");
    expect(ingest.stats().refusedConnections).toBe(1);
    expect(clients.every((c) => c.connected)).toBe(true);
  });

  it("the open-connection cap counts accepted probes too", async () => {
    const fleet = await createProbes(3);
    const ingest = await broker({ connections: { maxOpenPerAddress: 2 } });
    clients.push(await connectProbe(ingest.port, fleet[0]!), await connectProbe(ingest.port, fleet[1]!));
    expect(await tryConnect(ingest.port, fleet[2]!)).toBe("closed");
    expect(ingest.stats().refusedConnections).toBe(1);
  });

  it("a connection that sends no CONNECT is closed after the connect timeout", async () => {
    const ingest = await broker({ connectTimeoutMs: 300 });
    const c = raw(ingest.port);
    await c.opened;
    const t0 = Date.now();
    const at = await within(c.closed, 5_000);
    expect(at).not.toBe("timeout");
    expect((at as number) - t0).toBeGreaterThanOrEqual(250);
  });
});

describe("retained messages", () => {
  it("a retained publish is refused", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const ingest = await broker();
    const client = await connectProbe(ingest.port, p);
    clients.push(client);
    const readings = `wormward/${p.code}/readings`;
    // Acknowledged (no negative PUBACK in 3.1.1), recorded, and none of its readings stored.
    await client.publishAsync(readings, tempPack(p.code, nowS() - 5, 21), { qos: 1, retain: true });
    expect(client.connected).toBe(true);
    const rows = await rejectionsOf(p.id);
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ topic: readings, source: "mqtt" });
    expect(rows[0]!.reason).toMatch(/^retained: .*MQTT 3\.1\.1 §3\.3\.1\.3/);
    expect((await countReadings([p.id])).rows).toBe(0);
    // The same pack without the flag is stored.
    await client.publishAsync(readings, tempPack(p.code, nowS() - 5, 21), { qos: 1 });
    expect((await countReadings([p.id])).rows).toBe(1);
  });

  it("a retained will is refused when the broker would publish it", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const ingest = await broker();
    const presence = `wormward/${p.code}/presence`;
    const client = await connectProbe(ingest.port, p, { will: { topic: presence, payload: Buffer.from("gone"), qos: 1, retain: true } });
    clients.push(client);
    client.stream.destroy(); // gone without DISCONNECT: the broker publishes the will (§3.1.2.5)
    const rows = await waitFor(
      "the will's refusal",
      () => rejectionsOf(p.id),
      (r) => r.length > 0,
      5_000,
    );
    expect(rows.map((r) => [r.topic, r.reason.split(":")[0]])).toEqual([[presence, "retained"]]);
  });
});

describe("under attack", () => {
  it("a probe keeps publishing while 500 idle connections and bad CONNECTs hit the broker", { timeout: 90_000 }, async () => {
    const [p, victim] = (await createProbes(2)) as [TestProbe, TestProbe];
    // Limits set loose so that every idle connection and bad CONNECT really reaches the broker (all
    // come from 127.0.0.1 here); the connect timeout is what clears the idle ones.
    const ingest = await broker({
      connections: { maxPendingPerAddress: 10_000, maxOpenPerAddress: 10_000, attemptBurst: 100_000, attemptsPerMinute: 1e6 },
      connectTimeoutMs: 15_000,
    });
    const probe = await connectProbe(ingest.port, p);
    clients.push(probe);
    let wentOffline = 0;
    probe.on("offline", () => wentOffline++);
    const t = nowS() - 120;
    const publish = async (i: number) => {
      const at = Date.now();
      await probe.publishAsync(`wormward/${p.code}/readings`, tempPack(p.code, t + i, 20 + i / 100), { qos: 1 });
      return Date.now() - at;
    };
    const quiet: number[] = [];
    for (let i = 0; i < 20; i++) quiet.push(await publish(i));

    const idle: Raw[] = [];
    for (let i = 0; i < 500; i += 50) {
      const batch = Array.from({ length: 50 }, () => raw(ingest.port));
      await Promise.all(batch.map((c) => c.opened));
      idle.push(...batch);
    }
    let attacking = true;
    const answers: (number | null)[] = [];
    const attackers = Array.from({ length: 4 }, async () => {
      while (attacking) answers.push(await badConnect(ingest.port, victim.code));
    });
    const loud: number[] = [];
    for (let i = 20; i < 60; i++) loud.push(await publish(i));
    const lastAck = Date.now();
    attacking = false;
    await Promise.all(attackers);

    expect(wentOffline).toBe(0);
    expect((await countReadings([p.id])).rows).toBe(60);
    expect(answers.length).toBeGreaterThan(20);
    expect(answers.every((a) => a === 4)).toBe(true); // each bad CONNECT got its CONNACK 4 (§3.2.2.3)
    // Every publish was acknowledged while all 500 idle connections were held open...
    expect(idle.filter((c) => c.isClosed())).toHaveLength(0);
    // ...and then the broker closed each of them itself, at its connect timeout.
    const closedAt = await within(Promise.all(idle.map((c) => c.closed)), 30_000);
    expect(closedAt).not.toBe("timeout");
    expect(Math.min(...(closedAt as number[]))).toBeGreaterThan(lastAck);
    expect(probe.connected).toBe(true);
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    console.log(
      `publish-to-PUBACK: median ${median(quiet)} ms alone, ${median(loud)} ms (max ${Math.max(...loud)} ms) beside 500 idle connections and ${answers.length} bad CONNECTs`,
    );
  });

  it("with the default limits, idle connections past 50 from one address are refused at once and a probe keeps publishing", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const ingest = await broker({ connectTimeoutMs: 60_000 });
    const probe = await connectProbe(ingest.port, p);
    clients.push(probe);
    const idle = Array.from({ length: 200 }, () => raw(ingest.port));
    await Promise.all(idle.map((c) => c.opened));
    await waitFor(
      "refusals",
      async () => ingest.stats().refusedConnections,
      (n) => n >= 150,
      5_000,
    );
    await probe.publishAsync(`wormward/${p.code}/readings`, tempPack(p.code, nowS() - 5, 20), { qos: 1 });
    expect((await countReadings([p.id])).rows).toBe(1);
    expect(ingest.stats().refusedConnections).toBe(150);
    expect(idle.filter((c) => !c.isClosed())).toHaveLength(50);
  });
});
