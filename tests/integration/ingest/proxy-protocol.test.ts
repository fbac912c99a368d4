// Behind HAProxy every connection reaches a node from 127.0.0.1. With the PROXY protocol (HAProxy's
// "The PROXY protocol", version 1, §2.1) the node counts each client's own address, so one address
// spending its connect attempts does not lock every other probe out. Real broker (startIngest), a
// real HAProxy from Debian with `send-proxy`, real sockets; clients bind to other loopback addresses
// (127.0.0.0/8 is all loopback on Linux) to come from somewhere else.
import net from "node:net";
import type { MqttClient } from "mqtt";
import { afterEach, describe, expect, inject, it } from "vitest";
import { startIngest, type Ingest, type IngestOptions } from "@/ingest/service";
import { startHaproxy, stopHaproxy } from "@/lib/stack/haproxy";
import { connectPacket } from "../../helpers/mqtt-bytes";
import { probeTopics } from "@/lib/domain/vocabulary";
import { connectProbe, countReadings, createProbes, freePort, tempPack, waitFor } from "./helpers";

const started: Ingest[] = [];
const sockets: net.Socket[] = [];
const clients: MqttClient[] = [];
const balancers: string[] = [];

afterEach(async () => {
  for (const s of sockets.splice(0)) s.destroy();
  await Promise.all(clients.splice(0).map((c) => c.endAsync(true).catch(() => {})));
  for (const b of balancers.splice(0)) stopHaproxy(b);
  await Promise.all(started.splice(0).map((i) => i.close()));
});

async function broker(opts: Partial<IngestOptions> = {}) {
  const ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 }, proxyProtocol: true, ...opts });
  started.push(ingest);
  return ingest;
}

/** Writes `parts` (one write each) on a new connection from `from`; resolves with the CONNACK return code, or null when closed without one. */
async function attempt(port: number, parts: Buffer[], from = "127.0.0.1"): Promise<number | null> {
  const socket = net.connect({ port, host: "127.0.0.1", localAddress: from });
  sockets.push(socket);
  const chunks: Buffer[] = [];
  socket.on("data", (c: Buffer) => chunks.push(c));
  socket.on("error", () => {});
  await new Promise<void>((r) => socket.once("connect", () => r()));
  for (const p of parts) {
    socket.write(p);
    await new Promise((r) => setTimeout(r, 20));
  }
  // The broker answers a bad password with CONNACK 4 and closes (MQTT 3.1.1 §3.2.2.3).
  await new Promise<void>((r) => (socket.closed ? r() : socket.once("close", () => r())));
  const got = Buffer.concat(chunks);
  return got.length >= 4 && got[0] === 0x20 ? got[3]! : null;
}

const line = (address: string) => Buffer.from(`PROXY TCP4 ${address} 127.0.0.1 40000 1883\r\n`, "latin1");
const badConnect = (code: string) => connectPacket(code, code, "not-the-token");

describe("the PROXY protocol line", () => {
  it("names the address the limits count: one address out of attempts leaves another free", async () => {
    const ingest = await broker({ connections: { attemptBurst: 2, attemptsPerMinute: 1 } });
    // The line and the CONNECT in one write, and the line cut in two writes.
    expect(await attempt(ingest.port, [Buffer.concat([line("203.0.113.7"), badConnect("nobody-1")])])).toBe(4);
    const l = line("203.0.113.7");
    expect(await attempt(ingest.port, [l.subarray(0, 9), l.subarray(9), badConnect("nobody-2")])).toBe(4);
    // 203.0.113.7 has spent its two attempts: closed before the CONNECT is read.
    expect(await attempt(ingest.port, [line("203.0.113.7"), badConnect("nobody-3")])).toBeNull();
    // Another address behind the same balancer connection source is still answered.
    expect(await attempt(ingest.port, [line("198.51.100.4"), badConnect("nobody-4")])).toBe(4);
    expect(ingest.stats().refusedConnections).toBe(1);
  });

  it("is required: a connection without it, with a malformed one or with one too long is closed unanswered", async () => {
    const ingest = await broker();
    expect(await attempt(ingest.port, [badConnect("direct")])).toBeNull();
    expect(await attempt(ingest.port, [Buffer.from("PROXY TCP4 nonsense\r\n"), badConnect("bad-line")])).toBeNull();
    expect(await attempt(ingest.port, [Buffer.from(`PROXY TCP4 ${"1".repeat(120)}`)])).toBeNull();
    expect(ingest.stats().refusedConnections).toBe(3);
    // "PROXY UNKNOWN" (§2.1): the connection's own address is used.
    expect(await attempt(ingest.port, [Buffer.from("PROXY UNKNOWN\r\n"), badConnect("unknown")])).toBe(4);
  });

  it("through HAProxy with send-proxy: one address spending its attempts does not lock out a probe on another", async () => {
    const ingest = await broker({ connections: { attemptBurst: 3, attemptsPerMinute: 1 } });
    const name = `${inject("clusterName")}-haproxy-proxy-line`;
    const front = await freePort();
    await startHaproxy({ name, port: front, backends: [{ name: "node", port: ingest.port }], sendProxy: true });
    balancers.push(name);
    // HAProxy's own health checks (every 2 s) are connections too; the burst of 127.0.0.2 is its own.
    const answers: (number | null)[] = [];
    for (let i = 0; i < 5; i++) answers.push(await attempt(front, [badConnect(`stranger-${i}`)], "127.0.0.2"));
    expect(answers.slice(0, 3)).toEqual([4, 4, 4]);
    expect(answers.slice(3)).toEqual([null, null]);

    const [p] = await createProbes(1);
    const c = await connectProbe(front, p!);
    clients.push(c);
    await c.publishAsync(probeTopics(p!.code).readings, tempPack(p!.code, Math.floor(Date.now() / 1000) - 60, 21), { qos: 1 });
    expect(
      await waitFor(
        "the reading",
        () => countReadings([p!.id]),
        (n) => n.rows === 1,
        10_000,
      ),
    ).toMatchObject({ rows: 1 });
  }, 60_000);
});
