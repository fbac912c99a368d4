// Behind HAProxy every connection reaches a node from 127.0.0.1, so the per-address limits
// (connection-limits.ts) would count every probe of every farm as one address, and one farm's
// failing probes could lock all farms out. With the PROXY protocol (HAProxy's "The PROXY protocol",
// version 1, §2.1; `send-proxy` in lib/stack/haproxy.ts) the balancer first sends one text line
// naming the client's own address; it is read here, parsed by proxy-protocol-js, before any byte
// reaches the MQTT guard. The line is trusted, so a node that expects it listens only behind the
// balancer (loopback); a connection that does not start with a valid line is closed.
import type net from "node:net";
import { V1ProxyProtocol } from "proxy-protocol-js";

/** §2.1: "a receiver may reject an incomplete line which does not contain the CRLF sequence in the first 107 characters". */
export const PROXY_V1_MAX_BYTES = 107;

const SIGNATURE = Buffer.from("PROXY ", "latin1");

export type ProxySource = { address: string | undefined; port: number | undefined };

/**
 * Reads the PROXY v1 line at the start of `socket`: the client's address and port, or null when the
 * line is missing, malformed, too long or late (`timeoutMs`), or the socket closes first. Bytes after
 * the line are put back, and the socket is left paused for the next reader.
 */
export function readProxyHeader(socket: net.Socket, timeoutMs = 5_000): Promise<ProxySource | null> {
  // An error between this reader and the next would otherwise be unhandled; the next reader adds its own.
  socket.on("error", () => {});
  return new Promise((resolve) => {
    let buf: Buffer = Buffer.alloc(0);
    let settled = false;
    const done = (source: ProxySource | null, rest?: Buffer) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      socket.off("data", onData);
      socket.off("close", onClose);
      socket.pause();
      if (rest?.length) socket.unshift(rest);
      resolve(source);
    };
    const onClose = () => done(null);
    const onData = (chunk: Buffer) => {
      buf = buf.length ? Buffer.concat([buf, chunk]) : chunk;
      // Anything else than the line's start (an MQTT client straight at the node) is refused at once.
      const n = Math.min(buf.length, SIGNATURE.length);
      if (!buf.subarray(0, n).equals(SIGNATURE.subarray(0, n))) return done(null);
      const end = buf.indexOf("\r\n");
      if (end === -1 || end + 2 > PROXY_V1_MAX_BYTES) {
        if (end !== -1 || buf.length >= PROXY_V1_MAX_BYTES) done(null);
        return;
      }
      const line = buf.subarray(0, end + 2).toString("latin1");
      done(parseLine(line, socket), buf.subarray(end + 2));
    };
    const timer = setTimeout(() => done(null), timeoutMs);
    socket.on("data", onData);
    socket.on("close", onClose);
  });
}

function parseLine(line: string, socket: net.Socket): ProxySource | null {
  // §2.1: "PROXY UNKNOWN" (the balancer's own health check, or a family it cannot name): the
  // receiver uses the connection's real addresses.
  if (/^PROXY UNKNOWN[ \r]/.test(line)) return { address: socket.remoteAddress, port: socket.remotePort };
  try {
    const p = V1ProxyProtocol.parse(line);
    return { address: p.source.ipAddress, port: p.source.port };
  } catch {
    return null;
  }
}
