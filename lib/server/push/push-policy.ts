// Which push endpoints we send to: https on a push service the browsers use, never an address
// inside our own network. A subscription is a URL chosen by whoever subscribes, so without this a
// farm could make our servers POST to 127.0.0.1 or the cloud's metadata address.
import dns from "node:dns";
import net from "node:net";
import type { LookupFunction } from "node:net";
import { env } from "@/lib/server/env";

// The push services the major browsers hand out endpoints on:
// - Chrome, Chromium, Opera, Samsung Internet: Firebase Cloud Messaging (fcm.googleapis.com);
// - Firefox: Mozilla autopush (updates.push.services.mozilla.com);
// - Safari on macOS and iOS: Apple Push Notification service for the web (web.push.apple.com, and
//   the *.push.apple.com hosts Apple documents for its push servers);
// - Edge: Windows Push Notification Services (*.notify.windows.com).
export const DEFAULT_PUSH_SERVICE_HOSTS = [
  "fcm.googleapis.com",
  "updates.push.services.mozilla.com",
  "web.push.apple.com",
  "*.push.apple.com",
  "*.notify.windows.com",
];

export interface PushAllowList {
  // Host names, or "*.example.com" for any name below example.com (not example.com itself).
  hosts: string[];
  // The local fake push service (`npm start`, tests): allowed, and exempt from the address check.
  fakeOrigin?: string | null;
}

export function parseHostList(value: string | undefined): string[] {
  if (value === undefined || value.trim() === "") return DEFAULT_PUSH_SERVICE_HOSTS;
  return value
    .split(",")
    .map((h) => h.trim().toLowerCase().replace(/\.$/, ""))
    .filter(Boolean);
}

// The allow-list this process runs with: PUSH_SERVICE_HOSTS and PUSH_FAKE_ORIGIN.
export function configuredAllowList(): PushAllowList {
  const e = env();
  return { hosts: parseHostList(e.PUSH_SERVICE_HOSTS), fakeOrigin: e.PUSH_FAKE_ORIGIN ?? null };
}

function hostMatches(host: string, pattern: string): boolean {
  if (pattern.startsWith("*.")) return host.endsWith(pattern.slice(1)) && host.length > pattern.length - 1;
  return host === pattern;
}

function originOf(url: string): string | null {
  try {
    return new URL(url).origin;
  } catch {
    return null;
  }
}

export const isFakeOrigin = (endpoint: string, allow: PushAllowList) =>
  !!allow.fakeOrigin && originOf(endpoint) !== null && originOf(endpoint) === originOf(allow.fakeOrigin);

// null when the endpoint may be used; otherwise why not, in words for the person subscribing.
export function endpointProblem(endpoint: string, allow: PushAllowList): string | null {
  let url: URL;
  try {
    url = new URL(endpoint);
  } catch {
    return "The push endpoint must be a URL.";
  }
  if (url.protocol !== "https:") return "Push endpoints use https.";
  if (isFakeOrigin(endpoint, allow)) return null;
  if (url.username || url.password) return "A push endpoint carries no user name or password.";
  const host = url.hostname.toLowerCase().replace(/\.$/, "");
  if (!allow.hosts.some((p) => hostMatches(host, p))) {
    return `${host} is not a browser push service this server sends to.`;
  }
  const literal = host.replace(/^\[|\]$/g, "");
  if (net.isIP(literal) && isBlockedAddress(literal)) return `${host} is an address inside a private network.`;
  return null;
}

// RFC 6890 (special-purpose address registries), with the ranges that reach our own machines or
// network: loopback, RFC 1918 private, RFC 6598 shared (carrier NAT), RFC 3927 link-local (which
// holds the cloud metadata address 169.254.169.254), RFC 4193 unique-local, RFC 4291 link-local,
// plus "this network", benchmarking, multicast and reserved space that no push service uses.
const blocked = new net.BlockList();
for (const [net4, bits] of [
  ["0.0.0.0", 8],
  ["10.0.0.0", 8],
  ["100.64.0.0", 10],
  ["127.0.0.0", 8],
  ["169.254.0.0", 16],
  ["172.16.0.0", 12],
  ["192.0.0.0", 24],
  ["192.0.2.0", 24],
  ["192.168.0.0", 16],
  ["198.18.0.0", 15],
  ["198.51.100.0", 24],
  ["203.0.113.0", 24],
  ["224.0.0.0", 4],
  ["240.0.0.0", 4],
] as const)
  blocked.addSubnet(net4, bits, "ipv4");
for (const [net6, bits] of [
  ["::", 128],
  ["::1", 128],
  ["fc00::", 7],
  ["fe80::", 10],
  ["fec0::", 10],
  ["ff00::", 8],
  ["100::", 64],
  ["2001:db8::", 32],
] as const)
  blocked.addSubnet(net6, bits, "ipv6");

// Addresses that carry an IPv4 address inside an IPv6 one are judged by the IPv4 address:
// IPv4-mapped (RFC 4291 §2.5.5.2; BlockList applies IPv4 rules to these itself), NAT64
// (RFC 6052 64:ff9b::/96) and 6to4 (RFC 3056 2002::/16).
function embeddedIpv4(address: string): string | null {
  const lower = address.toLowerCase();
  const words = (prefix: string, at: number) => {
    const full = expandIpv6(lower);
    if (!full || !full.startsWith(prefix)) return null;
    const parts = full.split(":");
    const hi = parseInt(parts[at]!, 16);
    const lo = parseInt(parts[at + 1]!, 16);
    return `${hi >> 8}.${hi & 255}.${lo >> 8}.${lo & 255}`;
  };
  return words("0064:ff9b:0000:0000:0000:0000:", 6) ?? words("2002:", 1);
}

function expandIpv6(address: string): string | null {
  if (net.isIPv6(address) === false) return null;
  let text = address;
  const v4 = text.match(/(\d+\.\d+\.\d+\.\d+)$/);
  if (v4) {
    const o = v4[1]!.split(".").map(Number);
    text = text.slice(0, -v4[1]!.length) + `${((o[0]! << 8) | o[1]!).toString(16)}:${((o[2]! << 8) | o[3]!).toString(16)}`;
  }
  const [head = "", tail] = text.split("::");
  const h = head ? head.split(":") : [];
  const t = tail === undefined ? [] : tail ? tail.split(":") : [];
  const fill = tail === undefined ? [] : Array(8 - h.length - t.length).fill("0");
  const all = [...h, ...fill, ...t];
  if (all.length !== 8) return null;
  return all.map((w) => w.padStart(4, "0")).join(":");
}

export function isBlockedAddress(address: string): boolean {
  const family = net.isIP(address);
  if (family === 4) return blocked.check(address, "ipv4");
  if (family !== 6) return true; // not an address at all: refuse rather than guess
  if (blocked.check(address, "ipv6")) return true;
  const v4 = embeddedIpv4(address);
  return v4 !== null && blocked.check(v4, "ipv4");
}

export class BlockedAddressError extends Error {
  code = "WORMWARD_BLOCKED_ADDRESS";
}

// A DNS lookup for the connection itself: every address the name resolves to is checked right
// before the socket connects, so a name that passed an earlier check and then re-points to a
// private address (DNS rebinding) is refused too.
export const guardedLookup: LookupFunction = (hostname, options, callback) => {
  dns.lookup(hostname, { ...options, all: true }, (err, addresses) => {
    if (err) return callback(err, "", 0);
    const list = addresses as dns.LookupAddress[];
    const bad = list.find((a) => isBlockedAddress(a.address));
    if (bad || list.length === 0) {
      return callback(new BlockedAddressError(`${hostname} resolves to an address inside a private network`), "", 0);
    }
    if (options.all) return (callback as unknown as (e: null, a: dns.LookupAddress[]) => void)(null, list);
    callback(null, list[0]!.address, list[0]!.family);
  });
};
