import { describe, expect, it } from "vitest";
import { addressKey, createConnectionLimits, type Admission } from "@/ingest/connection-limits";

const limits = { attemptBurst: 3, attemptsPerMinute: 6, maxPendingPerAddress: 2, maxOpenPerAddress: 4 };
const ok = (a: Admission) => {
  if (!a.ok) throw new Error(`refused: ${a.why}`);
  return a;
};

describe("addressKey", () => {
  it("counts an IPv4-mapped IPv6 address as its IPv4 address", () => {
    expect(addressKey("::ffff:192.0.2.7")).toBe("192.0.2.7");
    expect(addressKey("192.0.2.7")).toBe("192.0.2.7");
  });

  it("counts IPv6 addresses by their /64, so one site cannot take a key per address (RFC 6177 §3)", () => {
    expect(addressKey("2001:db8:1:2::1")).toBe("2001:db8:1:2::/64");
    expect(addressKey("2001:0db8:0001:0002:ffff:eeee:dddd:cccc")).toBe("2001:db8:1:2::/64");
    expect(addressKey("2001:db8::5")).toBe("2001:db8:0:0::/64");
    expect(addressKey("::1")).toBe("0:0:0:0::/64");
    expect(addressKey("fe80::1%eth0")).toBe("fe80:0:0:0::/64");
  });
});

describe("createConnectionLimits", () => {
  it("refuses attempts past the burst until they are earned back", () => {
    let t = 0;
    const l = createConnectionLimits({ ...limits, maxPendingPerAddress: 10, maxOpenPerAddress: 10 }, () => t);
    for (let i = 0; i < 3; i++) ok(l.admit("192.0.2.1")).closed(); // three failures: never accepted
    expect(l.admit("192.0.2.1")).toMatchObject({ ok: false, why: "attempts" });
    expect(l.admit("192.0.2.2").ok).toBe(true); // another address has its own budget
    t += 10_000; // 6 a minute: one earned back every 10 s
    ok(l.admit("192.0.2.1")).closed();
    expect(l.admit("192.0.2.1")).toMatchObject({ ok: false, why: "attempts" });
  });

  it("gives an accepted attempt back, so probes sharing a NAT address can all reconnect", () => {
    const l = createConnectionLimits({ ...limits, maxOpenPerAddress: 100 }, () => 0);
    for (let i = 0; i < 50; i++) ok(l.admit("198.51.100.9")).accepted();
    expect(l.admit("198.51.100.9").ok).toBe(true);
  });

  it("limits connections still waiting for an accepted CONNECT, and all open ones", () => {
    const l = createConnectionLimits({ ...limits, attemptBurst: 100 }, () => 0);
    const a = ok(l.admit("203.0.113.5"));
    const b = ok(l.admit("203.0.113.5"));
    expect(l.admit("203.0.113.5")).toMatchObject({ ok: false, why: "pending" });
    a.accepted();
    b.accepted();
    const c = ok(l.admit("203.0.113.5"));
    c.accepted();
    ok(l.admit("203.0.113.5")).accepted();
    expect(l.admit("203.0.113.5")).toMatchObject({ ok: false, why: "open" }); // 4 open
    c.closed();
    c.closed(); // twice counts once
    expect(l.admit("203.0.113.5").ok).toBe(true);
  });

  it("forgets an address once it has nothing open and its budget is full again", () => {
    let t = 0;
    const l = createConnectionLimits(limits, () => t);
    ok(l.admit("192.0.2.1")).closed();
    expect(l.size()).toBe(1);
    t += 60_000;
    ok(l.admit("192.0.2.1")).closed();
    expect(l.size()).toBe(1); // one attempt spent again just now
    const a = ok(l.admit("192.0.2.3"));
    a.accepted();
    a.closed();
    expect(l.size()).toBe(1); // an accepted one gave its token back: 192.0.2.3 is not kept
  });
});
