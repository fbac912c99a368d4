// A probe counts as connected while it holds a connection, and as gone after a clean disconnect, its
// will ("gone" on wormward/<code>/presence), or a keep-alive that ran out. (The column is probes.online;
// the probe list shows it only as a detail beside reporting or silent.)
import { once } from "node:events";
import net from "node:net";
import { eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { probes } from "@/db/schema";
import { startIngest, type Ingest } from "@/ingest/service";
import { PRESENCE_GONE, PRESENCE_HERE, probeTopics } from "@/lib/domain/vocabulary";
import { connectProbe, createProbes, rejectionsOf, waitFor, type TestProbe } from "./helpers";

let ingest: Ingest;
let fleet: TestProbe[];
const clients: MqttClient[] = [];
const sockets: net.Socket[] = [];

beforeAll(async () => {
  fleet = await createProbes(5);
  ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 } });
});
afterAll(async () => {
  for (const s of sockets) s.destroy();
  await Promise.all(clients.map((c) => c.endAsync(true)));
  await ingest.close();
});

const connected = async (p: TestProbe) => (await db().select({ online: probes.online }).from(probes).where(eq(probes.id, p.id)))[0]?.online;
const becomes = (p: TestProbe, want: boolean) =>
  waitFor(
    `${p.code} connected=${want}`,
    () => connected(p),
    (v) => v === want,
    10_000,
  );

async function connect(p: TestProbe, extra = {}) {
  const c = await connectProbe(ingest.port, p, extra);
  c.on("error", () => {});
  clients.push(c);
  return c;
}

// MQTT 3.1.1 §2.2.3: Remaining Length, 7 bits a byte with a continuation bit.
function remainingLength(n: number): number[] {
  const out: number[] = [];
  do {
    let byte = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) byte |= 0x80;
    out.push(byte);
  } while (n > 0);
  return out;
}

const utf8 = (s: string) => {
  const b = Buffer.from(s, "utf8");
  return Buffer.concat([Buffer.from([b.length >> 8, b.length & 0xff]), b]);
};

/** A CONNECT packet (MQTT 3.1.1 §3.1) with user name, password, clean session and a QoS 1 will. */
function connectPacket(o: { clientId: string; username: string; password: string; keepalive: number; will: { topic: string; message: string } }) {
  const flags = 0x80 | 0x40 | (1 << 3) | 0x04 | 0x02; // user name, password, will QoS 1, will flag, clean session
  const variable = Buffer.concat([utf8("MQTT"), Buffer.from([4, flags, o.keepalive >> 8, o.keepalive & 0xff])]);
  const payload = Buffer.concat([utf8(o.clientId), utf8(o.will.topic), utf8(o.will.message), utf8(o.username), utf8(o.password)]);
  const body = Buffer.concat([variable, payload]);
  return Buffer.concat([Buffer.from([0x10, ...remainingLength(body.length)]), body]);
}

describe("probe connection state", () => {
  it("is connected while it holds a connection and gone after a clean disconnect", async () => {
    const p = fleet[0]!;
    expect(await connected(p)).toBe(false);
    const c = await connect(p);
    await becomes(p, true);
    await c.endAsync();
    await becomes(p, false);
  });

  it('is gone when the connection drops without DISCONNECT and its will says "gone"', async () => {
    const p = fleet[1]!;
    const c = await connect(p, { will: { topic: probeTopics(p.code).presence, payload: Buffer.from(PRESENCE_GONE), qos: 1, retain: false } });
    await becomes(p, true);
    c.stream.destroy(); // no DISCONNECT: the broker publishes the will (§3.1.2.5)
    await becomes(p, false);
    expect(await rejectionsOf(p.id)).toEqual([]);
  });

  it("is gone when the keep-alive runs out: 1.5 × Keep Alive without a packet (§3.1.2-24)", async () => {
    const p = fleet[2]!;
    const s = net.connect(ingest.port, "127.0.0.1");
    sockets.push(s);
    await once(s, "connect");
    s.write(
      connectPacket({
        clientId: p.code,
        username: p.code,
        password: p.token,
        keepalive: 1,
        will: { topic: probeTopics(p.code).presence, message: PRESENCE_GONE },
      }),
    );
    const [connack] = (await once(s, "data")) as [Buffer];
    expect([...connack]).toEqual([0x20, 0x02, 0x00, 0x00]); // §3.2: accepted
    const connectedAt = Date.now();
    await becomes(p, true);
    await once(s, "close"); // we send nothing, not even PINGREQ
    expect(Date.now() - connectedAt).toBeGreaterThanOrEqual(1500);
    await becomes(p, false);
  });

  it("ignores another probe's will aimed at this probe's presence topic", async () => {
    const [victim, other] = [fleet[3]!, fleet[4]!];
    expect(await connected(victim)).toBe(false);
    const c = await connect(other, { will: { topic: probeTopics(victim.code).presence, payload: Buffer.from(PRESENCE_HERE), qos: 1, retain: false } });
    c.stream.destroy();
    // The will is authorized (and refused) before the disconnect is handled, so by now it would show.
    await becomes(other, false);
    expect(await connected(victim)).toBe(false);
  });

  it("stays connected when a second connection drops with its will, or a new one takes over the client id", async () => {
    const p = fleet[2]!;
    const will = { topic: probeTopics(p.code).presence, payload: Buffer.from(PRESENCE_GONE), qos: 1 as const, retain: false };
    const first = await connect(p, { will });
    const second = await connect(p, { clientId: `${p.code}:2`, will });
    await becomes(p, true);
    first.stream.destroy();
    // Both the will and the disconnect of the first are handled once the second can publish and be acked.
    await second.publishAsync(probeTopics(p.code).presence, PRESENCE_HERE, { qos: 1 });
    await new Promise((r) => setTimeout(r, 200));
    expect(await connected(p)).toBe(true);
    // MQTT 3.1.1 §3.1.4-2: a second CONNECT with the same client id closes the first connection.
    const third = await connect(p, { clientId: `${p.code}:2`, will });
    await new Promise((r) => setTimeout(r, 300));
    expect(third.connected).toBe(true);
    expect(await connected(p)).toBe(true);
  });

  it('records a presence message or will that is neither "here" nor "gone", and the old words too', async () => {
    const p = fleet[0]!;
    const presence = probeTopics(p.code).presence;
    const c = await connect(p, { will: { topic: presence, payload: Buffer.from("gone fishing"), qos: 1, retain: false } });
    await c.publishAsync(presence, "sleepy", { qos: 1 });
    await c.publishAsync(presence, "online", { qos: 1 });
    c.stream.destroy();
    await becomes(p, false);
    const rows = await waitFor(
      "three rejections",
      () => rejectionsOf(p.id),
      (r) => r.length >= 3,
      10_000,
    );
    expect(rows.map((r) => [r.reason.split(":")[0], r.topic, r.excerpt])).toEqual([
      ["bad-presence", presence, "sleepy"],
      ["bad-presence", presence, "online"],
      ["bad-presence", presence, "gone fishing"],
    ]);
    expect(rows[0]!.reason).toBe('bad-presence: a presence message says "here" or "gone"');
  });
});
