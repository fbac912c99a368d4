// Per client address: how often it may try to connect, and how many connections it may hold open.
// MQTT 3.1.1 §5.4.8 names repeated connection and authentication attempts, and clients that connect
// but send nothing, as the behaviour a server should detect. Probes of one farm often share a NAT
// address, so an attempt that ends in an accepted CONNECT gives its token back: only failures (bad
// credentials, garbage, silence until the connect timeout) spend the address's budget.
import net from "node:net";

export type ConnectionLimits = {
  /** Attempts an address may make at once before it must wait. */
  attemptBurst: number;
  /** Attempts an address earns back each minute. */
  attemptsPerMinute: number;
  /** Open connections of an address that have not (yet) had a CONNECT accepted. */
  maxPendingPerAddress: number;
  /** All open connections of an address, accepted ones included (a farm's probes behind one NAT). */
  maxOpenPerAddress: number;
};

export const DEFAULT_CONNECTION_LIMITS: ConnectionLimits = {
  attemptBurst: 100,
  // Two a second: one misconfigured probe retrying every second (MQTT.js's default reconnect period)
  // cannot keep its NAT-mates out, and a flood of hundreds a second still stops at the burst.
  attemptsPerMinute: 120,
  maxPendingPerAddress: 50,
  maxOpenPerAddress: 1000,
};

export type Admission = { ok: true; key: string; accepted(): void; closed(): void } | { ok: false; key: string; why: "attempts" | "pending" | "open" };

type Entry = { tokens: number; at: number; pending: number; open: number };

/**
 * The key an address is counted under: IPv4 as it is (an IPv4-mapped IPv6 address as its IPv4), and
 * IPv6 by its /64, the smallest prefix a site is given (RFC 6177 §3), or one host could take many keys.
 */
export function addressKey(address: string | undefined): string {
  if (!address) return "unknown";
  const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(address);
  if (mapped) return mapped[1]!;
  if (!net.isIPv6(address)) return address;
  const [head = "", tail = ""] = address.split("%")[0]!.split("::");
  const left = head ? head.split(":") : [];
  const right = address.includes("::") ? (tail ? tail.split(":") : []) : [];
  const groups = [...left, ...Array(8 - left.length - right.length).fill("0"), ...right];
  return `${groups
    .slice(0, 4)
    .map((g) => parseInt(g, 16).toString(16))
    .join(":")}::/64`;
}

export function createConnectionLimits(limits: ConnectionLimits, now: () => number = Date.now) {
  const entries = new Map<string, Entry>();
  const perMs = limits.attemptsPerMinute / 60_000;

  const refill = (e: Entry, t: number) => {
    e.tokens = Math.min(limits.attemptBurst, e.tokens + (t - e.at) * perMs);
    e.at = t;
  };
  // An address with nothing open and a full budget needs no memory.
  const forget = (key: string, e: Entry) => {
    refill(e, now());
    if (e.open === 0 && e.tokens >= limits.attemptBurst) entries.delete(key);
  };

  return {
    admit(address: string | undefined): Admission {
      const key = addressKey(address);
      const t = now();
      const e = entries.get(key) ?? { tokens: limits.attemptBurst, at: t, pending: 0, open: 0 };
      entries.set(key, e);
      refill(e, t);
      const refused = (why: "attempts" | "pending" | "open"): Admission => {
        forget(key, e);
        return { ok: false, key, why };
      };
      if (e.tokens < 1) return refused("attempts");
      if (e.pending >= limits.maxPendingPerAddress) return refused("pending");
      if (e.open >= limits.maxOpenPerAddress) return refused("open");
      e.tokens -= 1;
      e.pending++;
      e.open++;
      let pending = true;
      let open = true;
      return {
        ok: true,
        key,
        accepted() {
          if (!pending) return;
          pending = false;
          e.pending--;
          refill(e, now());
          e.tokens = Math.min(limits.attemptBurst, e.tokens + 1);
        },
        closed() {
          if (!open) return;
          open = false;
          if (pending) e.pending--;
          pending = false;
          e.open--;
          forget(key, e);
        },
      };
    },
    /** Addresses being remembered (for tests and the log). */
    size: () => entries.size,
  };
}
