// The guard between a socket and aedes, over a real loopback connection: what it lets through, what
// it holds back, and when it closes (MQTT 3.1.1 §2.2 fixed header, §2.2.3 Remaining Length).
import net from "node:net";
import { afterEach, describe, expect, it } from "vitest";
import { FrameGuard, PacketTooLarge } from "@/ingest/frame-guard";
import { varint } from "../helpers/mqtt-bytes";

type Pair = { client: net.Socket; guard: FrameGuard; passed: () => Buffer; closed: Promise<Error | null> };
const open: (() => void)[] = [];
afterEach(() => {
  for (const f of open.splice(0)) f();
});

async function pair(limits = { connectMaxBytes: 64, packetMaxBytes: 300 }): Promise<Pair> {
  const server = net.createServer();
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  const accepted = new Promise<net.Socket>((r) => server.once("connection", r));
  const client = net.connect((server.address() as net.AddressInfo).port, "127.0.0.1");
  client.on("error", () => {});
  const guard = new FrameGuard(await accepted, limits);
  const chunks: Buffer[] = [];
  guard.on("data", (c: Buffer) => chunks.push(c));
  let failure: Error | null = null;
  guard.on("error", (e) => (failure = e));
  const closed = new Promise<Error | null>((r) => guard.once("close", () => r(failure)));
  open.push(() => {
    client.destroy();
    guard.destroy();
    server.close();
  });
  return { client, guard, passed: () => Buffer.concat(chunks), closed };
}

const packet = (type: number, bodyBytes: number) => Buffer.concat([Buffer.from([type << 4]), varint(bodyBytes), Buffer.alloc(bodyBytes, 7)]);
const settle = () => new Promise((r) => setTimeout(r, 50));
const within = <T>(p: Promise<T>, ms: number) => Promise.race([p, new Promise<"open">((r) => setTimeout(() => r("open"), ms))]);

describe("FrameGuard", () => {
  it("passes a CONNECT sent a byte at a time, and holds what follows until the broker accepts it", async () => {
    const { client, guard, passed } = await pair();
    const connect = packet(1, 40);
    const publish = packet(3, 200);
    for (const b of connect) {
      client.write(Buffer.from([b]));
      await new Promise((r) => setImmediate(r));
    }
    client.write(publish);
    await settle();
    expect(passed()).toEqual(connect);
    guard.accept();
    await settle();
    expect(passed()).toEqual(Buffer.concat([connect, publish]));
  });

  it("closes before CONNECT at the header of a packet over the first-packet cap", async () => {
    const { client, passed, closed } = await pair();
    client.write(Buffer.from([0x10, ...varint(1000)]));
    const err = await within(closed, 2000);
    expect(err).toBeInstanceOf(PacketTooLarge);
    expect((err as PacketTooLarge).beforeConnect).toBe(true);
    expect(passed()).toHaveLength(0);
  });

  it("takes a packet of exactly the cap and cuts one byte more, after acceptance", async () => {
    const { client, guard, passed, closed } = await pair();
    client.write(packet(1, 10));
    await settle();
    guard.accept();
    const fits = packet(8, 300 - 3); // SUBSCRIBE: 1 type byte + 2 length bytes + 297 = 300
    expect(fits).toHaveLength(300);
    client.write(fits);
    await settle();
    expect(passed()).toHaveLength(12 + 300);
    client.write(packet(8, 298).subarray(0, 3));
    const err = await within(closed, 2000);
    expect(err).toBeInstanceOf(PacketTooLarge);
    expect((err as PacketTooLarge).bytes).toBe(301);
  });

  it("reads past an oversized PUBLISH, handing on its topic and packet id with a marker for a body", async () => {
    const { client, guard, passed, closed } = await pair();
    const connect = packet(1, 10);
    client.write(connect);
    await settle();
    guard.accept();
    // §3.3: QoS 1 PUBLISH (0x32), topic "a/b", packet id 7, then 1 MiB of payload, sent in pieces
    const body = Buffer.concat([Buffer.from([0, 3, 0x61, 0x2f, 0x62, 0, 7]), Buffer.alloc(1024 * 1024, 0x41)]);
    const big = Buffer.concat([Buffer.from([0x32]), varint(body.length), body]);
    for (let at = 0; at < big.length; at += 7000) client.write(big.subarray(at, at + 7000));
    const after = packet(12, 0); // PINGREQ, §3.12
    client.write(after);
    await settle();
    await new Promise((r) => setTimeout(r, 200));
    const got = passed().subarray(connect.length);
    // 0x32, length 23, topic, packet id, 16 marker bytes; then the PINGREQ untouched
    expect(got.subarray(0, 9)).toEqual(Buffer.from([0x32, 23, 0, 3, 0x61, 0x2f, 0x62, 0, 7]));
    expect(got).toHaveLength(2 + 23 + 2);
    expect(got.subarray(25)).toEqual(after);
    expect(guard.takeCut(got.subarray(9, 25))).toBe(big.length);
    expect(guard.takeCut(Buffer.alloc(16))).toBeNull(); // anything else is an ordinary payload
    expect(await within(closed, 100)).toBe("open");
  });

  it("passes packets whose fixed header is split across chunks unchanged", async () => {
    const { client, guard, passed } = await pair({ connectMaxBytes: 64, packetMaxBytes: 100_000 });
    const connect = packet(1, 10);
    client.write(connect);
    await settle();
    guard.accept();
    const a = packet(3, 20_000); // three length bytes
    const b = packet(3, 50);
    const all = Buffer.concat([a, b]);
    // header of `a` split after its first and second byte, `b`'s split after its type byte
    const pieces = [all.subarray(0, 1), all.subarray(1, 2), all.subarray(2, 20_004), all.subarray(20_004, 20_005), all.subarray(20_005)];
    for (const piece of pieces) {
      client.write(piece);
      await settle();
    }
    expect(passed()).toEqual(Buffer.concat([connect, all]));
  });

  it("closes on a Remaining Length longer than four bytes (MQTT 3.1.1 §2.2.3)", async () => {
    const { client, closed } = await pair({ connectMaxBytes: 64, packetMaxBytes: 1 << 30 });
    client.write(Buffer.from([0x10, 0x80, 0x80, 0x80, 0x80, 0x01]));
    expect(String(await within(closed, 2000))).toMatch(/malformed Remaining Length/);
  });

  it("closes when the first packet is not a CONNECT (MQTT 3.1.1 §3.1)", async () => {
    const { client, closed } = await pair();
    client.write(packet(3, 5));
    expect(String(await within(closed, 2000))).toMatch(/first packet must be a CONNECT/);
  });

  it("writes what the broker sends back to the socket", async () => {
    const { client, guard } = await pair();
    const got = new Promise<Buffer>((r) => client.once("data", r));
    guard.write(Buffer.from([0x20, 2, 0, 0])); // CONNACK, §3.2
    expect(await got).toEqual(Buffer.from([0x20, 2, 0, 0]));
  });
});
