// Sits between a TCP socket and aedes. mqtt-packet buffers a whole packet before it parses it, and
// the Remaining Length allows 256 MB (MQTT 3.1.1 §2.2.3), so the guard follows each packet's fixed
// header as the bytes arrive and never lets a packet over the cap reach the parser:
// - before the broker accepts the CONNECT, only that one small packet passes; anything larger, or
//   anything else, closes the connection;
// - after, an oversized PUBLISH is read past (its body counted, not kept) and aedes gets the same
//   PUBLISH with the body replaced by this connection's marker, so the ingest records it as too
//   large and acknowledges it (a QoS 1 message never acknowledged would come back forever);
//   any other oversized packet closes the connection.
import { randomBytes } from "node:crypto";
import { Duplex } from "node:stream";
import type net from "node:net";

export type FrameLimits = {
  /** The CONNECT, the only packet of a connection that is not yet authenticated (MQTT-3.1.0-1). */
  connectMaxBytes: number;
  /** Any packet after the CONNECT was accepted. */
  packetMaxBytes: number;
};

export class PacketTooLarge extends Error {
  constructor(
    readonly bytes: number,
    readonly max: number,
    readonly beforeConnect: boolean,
  ) {
    super(`a packet of ${bytes} bytes is over the ${max}-byte cap${beforeConnect ? " before CONNECT is accepted" : ""}`);
  }
}

// Packet types, MQTT 3.1.1 §2.2.1
const CONNECT = 1;
const PUBLISH = 3;
// A topic longer than this in an oversized PUBLISH is not worth reading: the connection is closed.
const TOPIC_MAX_BYTES = 256;

type State = "header" | "pass" | "topic" | "drop";

export class FrameGuard extends Duplex {
  readonly remoteAddress: string | undefined;
  readonly remotePort: number | undefined;
  /** Stands in for the body of a PUBLISH that was read past; unguessable, so no probe can send it. */
  private readonly marker = randomBytes(16);
  private readonly cutSizes: number[] = [];
  private accepted = false;
  private held: Buffer | null = null;
  private wantMore = true;
  private ended = false;
  private packets = 0;
  private state: State = "header";
  // The fixed header being read (at most 5 bytes) and what it said.
  private header: number[] = [];
  private length = 0;
  private left = 0; // body bytes of the current packet still to pass or drop
  private topicPart: number[] = []; // topic length, topic and packet id of a PUBLISH read past
  private corked = false;

  constructor(
    private readonly socket: net.Socket,
    private readonly limits: FrameLimits,
    private readonly onAccept: () => void = () => {},
    // The client's own address when a balancer named it (PROXY protocol, proxy-header.ts).
    from: { address: string | undefined; port: number | undefined } = { address: socket.remoteAddress, port: socket.remotePort },
  ) {
    super({ allowHalfOpen: true });
    this.remoteAddress = from.address;
    this.remotePort = from.port;
    socket.on("data", (chunk: Buffer) => this.arrived(chunk));
    socket.on("end", () => {
      this.ended = true;
      if (!this.held) this.push(null);
    });
    socket.on("error", (err) => this.destroy(err));
    socket.on("close", () => this.destroy());
  }

  /** The broker accepted the CONNECT: later packets may be as large as `packetMaxBytes`. */
  accept(): void {
    if (this.accepted || this.destroyed) return;
    this.accepted = true;
    this.onAccept();
    const held = this.held;
    this.held = null;
    if (held) this.arrived(held);
    if (this.destroyed) return;
    if (this.ended) this.push(null);
    else if (this.wantMore) this.socket.resume();
  }

  /** The size of the PUBLISH this payload stands for, when it is this guard's marker; else null. */
  takeCut(payload: Buffer | string): number | null {
    if (!Buffer.isBuffer(payload) || !payload.equals(this.marker)) return null;
    return this.cutSizes.shift() ?? null;
  }

  private arrived(chunk: Buffer) {
    if (this.destroyed) return;
    if (this.held) {
      // The socket is paused; at most what was already read waits here.
      this.held = Buffer.concat([this.held, chunk]);
      if (this.held.length > this.limits.packetMaxBytes) this.refuse(new Error("too much sent before CONNECT was accepted"));
      return;
    }
    const out = this.scan(chunk);
    if (!out) return;
    for (const part of out) {
      if (!this.push(part)) {
        this.wantMore = false;
        this.socket.pause();
      }
    }
  }

  /** Follows fixed headers through `chunk`; returns what may pass to aedes now, or null when the connection was closed. */
  private scan(chunk: Buffer): Buffer[] | null {
    const out: Buffer[] = [];
    let from = 0; // start of the bytes of this chunk that pass, not yet added to `out`
    let headerAt = -1; // where the current fixed header began in this chunk
    const flush = (end: number) => {
      if (end > from) out.push(chunk.subarray(from, end));
      from = end;
    };
    let i = 0;
    while (i < chunk.length) {
      if (!this.accepted && this.packets > 0) {
        // Bytes after the CONNECT wait (the socket paused) until the broker has accepted it.
        flush(i);
        this.held = chunk.subarray(i);
        this.socket.pause();
        return out;
      }
      if (this.state === "pass" || this.state === "drop") {
        const n = Math.min(this.left, chunk.length - i);
        this.left -= n;
        i += n;
        if (this.state === "drop") from = i;
        if (this.left === 0) this.packetEnded();
        continue;
      }
      if (this.state === "topic") {
        this.topicPart.push(chunk[i++]!);
        from = i;
        this.left--;
        const got = this.readPast();
        if (got === "malformed") return this.refuse(new Error("malformed PUBLISH (MQTT 3.1.1 §3.3.2)"));
        if (got) {
          out.push(got);
          this.state = "drop";
          if (this.left === 0) this.packetEnded();
        }
        continue;
      }
      // The fixed header, §2.2: one byte of type and flags, then the Remaining Length.
      if (this.header.length === 0) {
        headerAt = i;
        const type = chunk[i]! >> 4;
        if (!this.accepted && type !== CONNECT) return this.refuse(new Error("the first packet must be a CONNECT (MQTT 3.1.1 §3.1)"));
      }
      const byte = chunk[i++]!;
      this.header.push(byte);
      if (this.header.length === 1) continue;
      // §2.2.3: seven bits a byte, low first; the high bit says another byte follows; four at most.
      this.length += (byte & 0x7f) * 128 ** (this.header.length - 2);
      if (byte & 0x80) {
        if (this.header.length === 5) return this.refuse(new Error("malformed Remaining Length (MQTT 3.1.1 §2.2.3)"));
        continue;
      }
      // The header is whole. Bytes of it that came in an earlier chunk were held back until now.
      const carried = headerAt < 0 ? this.header.length - i : 0;
      const total = this.header.length + this.length;
      const max = this.accepted ? this.limits.packetMaxBytes : this.limits.connectMaxBytes;
      this.left = this.length;
      if (total <= max) {
        if (carried > 0) out.push(Buffer.from(this.header.slice(0, carried)));
        this.state = "pass";
      } else if (this.accepted && this.header[0]! >> 4 === PUBLISH) {
        flush(Math.max(headerAt, 0));
        from = i;
        this.cutSizes.push(total);
        this.state = "topic";
      } else {
        return this.refuse(new PacketTooLarge(total, max, !this.accepted));
      }
      if (this.left === 0) this.packetEnded();
    }
    if (this.state === "header" && this.header.length > 0) flush(Math.max(headerAt, 0));
    else flush(i);
    return out;
  }

  /** Once the topic (and packet id) of a PUBLISH read past are in: the PUBLISH aedes gets instead. */
  private readPast(): Buffer | "malformed" | null {
    const v = this.topicPart;
    if (v.length < 2) return null;
    const topicBytes = (v[0]! << 8) | v[1]!;
    if (topicBytes > TOPIC_MAX_BYTES) return "malformed";
    const qos = (this.header[0]! >> 1) & 3;
    const need = 2 + topicBytes + (qos > 0 ? 2 : 0); // §3.3.2: topic name, then a packet id at QoS 1 and 2
    if (v.length < need) return this.left === 0 ? "malformed" : null;
    const body = Buffer.concat([Buffer.from(v), this.marker]);
    this.topicPart = [];
    return Buffer.concat([Buffer.from([this.header[0]!]), remainingLength(body.length), body]);
  }

  private packetEnded() {
    this.packets++;
    this.state = "header";
    this.header = [];
    this.length = 0;
    this.topicPart = [];
  }

  private refuse(err: Error): null {
    this.socket.destroy();
    this.destroy(err);
    return null;
  }

  override _read(): void {
    this.wantMore = true;
    if (this.held === null && !this.socket.destroyed) this.socket.resume();
  }

  override _write(chunk: Buffer, _enc: BufferEncoding, cb: (err?: Error | null) => void): void {
    // One commit releases many PUBACKs in the same turn: corked until the next tick, they leave in one
    // write (one syscall and one TCP segment) instead of one each.
    if (!this.corked) {
      this.corked = true;
      this.socket.cork();
      process.nextTick(() => {
        this.corked = false;
        this.socket.uncork();
      });
    }
    if (this.socket.write(chunk)) cb();
    else this.socket.once("drain", () => cb());
  }

  override _final(cb: (err?: Error | null) => void): void {
    this.socket.end();
    cb();
  }

  override _destroy(err: Error | null, cb: (err?: Error | null) => void): void {
    this.held = null;
    this.socket.destroy();
    cb(err);
  }
}

/** §2.2.3 */
function remainingLength(n: number): Buffer {
  const out: number[] = [];
  do {
    let b = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) b |= 0x80;
    out.push(b);
  } while (n > 0);
  return Buffer.from(out);
}
