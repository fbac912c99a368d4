// The client's address, for the sign-in limit per address. Pure.
//
// `next start` fills X-Forwarded-For from the socket only when the request has none
// (node_modules/next/dist/server/base-server.js: `req.headers['x-forwarded-for'] ??= socket.remoteAddress`),
// so a client talking to the app directly can write any address there. The header is read only
// when the app is told how many proxies of ours stand in front (TRUSTED_PROXY_HOPS); each appends
// the address it saw (RFC 7239 §5.2 describes the same chain for `Forwarded: for=`), so the entry
// `hops` places from the right is the one the outermost proxy wrote, and nothing left of it counts.
// With 0 hops there is no address we can trust: the per-address limit is skipped and the
// per-account limit alone applies.
import { isIP } from "node:net";

export function clientAddress(forwardedFor: string | null | undefined, hops: number): string | null {
  if (hops < 1 || !forwardedFor) return null;
  const entries = forwardedFor.split(",").map((e) => e.trim());
  const entry = entries[entries.length - hops];
  if (!entry) return null;
  // An IPv4 client seen through a dual-stack socket reads ::ffff:a.b.c.d; one address, one key.
  const plain = entry.toLowerCase().replace(/^::ffff:(?=\d+\.\d+\.\d+\.\d+$)/, "");
  return isIP(plain) ? plain : null;
}
