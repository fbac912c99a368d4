// Sits between a TCP socket and aedes. mqtt-packet buffers a whole packet before it parses it, and
// the Remaining Length allows 256 MB (MQTT 3.1.1 §2.2.3), so the guard reads only each packet's
// fixed header as the bytes arrive and closes the connection as soon as a packet would be too big.
// Until the broker accepts the CONNECT, only that one small packet is let through.
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

const CONNECT = 1; // packet type, MQTT 3.1.1 §2.2.1

export class FrameGuard extends Duplex {
  readonly remoteAddress: string | undefined;
  readonly remotePort: number | undefined;
  private accepted = false;
  private held: Buffer | null = null;
  private wantMore = true;
  private ended = false;
  private packets = 0;
  // Header reading state: bytes of the current packet's body still to pass, or the length being read.
  private skip = 0;
  private inHeader = true;
  private typeByte = -1;
  private length = 0;
  private lengthBytes = 0;

  constructor(
    private readonly socket: net.Socket,
    private readonly limits: FrameLimits,
    private readonly onAccept: () => void = () => {},
  ) {
    super({ allowHalfOpen: true });
    this.remoteAddress = socket.remoteAddress;
    this.remotePort = socket.remotePort;
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

  private arrived(chunk: Buffer) {
    if (this.destroyed) return;
    if (this.held) {
      // The socket is paused; at most what was already read waits here.
      this.held = Buffer.concat([this.held, chunk]);
      if (this.held.length > this.limits.packetMaxBytes) this.refuse(new Error("too much sent before CONNECT was accepted"));
      return;
    }
    const end = this.scan(chunk);
    if (end < 0) return;
    const pass = end === chunk.length ? chunk : chunk.subarray(0, end);
    if (end < chunk.length) {
      // Bytes after the CONNECT wait (the socket paused) until the broker has accepted it.
      this.held = chunk.subarray(end);
      this.socket.pause();
    }
    if (pass.length > 0 && !this.push(pass)) {
      this.wantMore = false;
      this.socket.pause();
    }
  }

  /**
   * Follows fixed headers through `chunk`. Returns how much of it may pass now (all of it, or up to
   * the end of the CONNECT of a connection not yet accepted), or -1 when the connection was closed.
   */
  private scan(chunk: Buffer): number {
    let i = 0;
    while (i < chunk.length) {
      if (!this.accepted && this.packets > 0) return i;
      if (!this.inHeader) {
        const n = Math.min(this.skip, chunk.length - i);
        this.skip -= n;
        i += n;
        if (this.skip === 0) this.packetEnded();
        continue;
      }
      const byte = chunk[i++]!;
      if (this.typeByte < 0) {
        this.typeByte = byte;
        if (!this.accepted && this.packets === 0 && byte >> 4 !== CONNECT) {
          return this.refuse(new Error("the first packet must be a CONNECT (MQTT 3.1.1 §3.1)"));
        }
        continue;
      }
      // §2.2.3: seven bits a byte, low first; the high bit says another byte follows; four at most.
      this.length += (byte & 0x7f) * 128 ** this.lengthBytes++;
      if (byte & 0x80) {
        if (this.lengthBytes === 4) return this.refuse(new Error("malformed Remaining Length (MQTT 3.1.1 §2.2.3)"));
        continue;
      }
      const total = 1 + this.lengthBytes + this.length;
      const max = this.accepted ? this.limits.packetMaxBytes : this.limits.connectMaxBytes;
      if (total > max) return this.refuse(new PacketTooLarge(total, max, !this.accepted));
      this.inHeader = false;
      this.skip = this.length;
      if (this.skip === 0) this.packetEnded();
    }
    return i;
  }

  private packetEnded() {
    this.packets++;
    this.inHeader = true;
    this.typeByte = -1;
    this.length = 0;
    this.lengthBytes = 0;
  }

  private refuse(err: Error): -1 {
    this.socket.destroy();
    this.destroy(err);
    return -1;
  }

  override _read(): void {
    this.wantMore = true;
    if (this.held === null && !this.socket.destroyed) this.socket.resume();
  }

  override _write(chunk: Buffer, _enc: BufferEncoding, cb: (err?: Error | null) => void): void {
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
