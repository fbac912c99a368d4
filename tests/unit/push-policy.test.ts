// Which endpoints we send pushes to (lib/server/push/push-policy.ts): the browsers' push services by name, and
// never an address of a private network, however it is written.
import { describe, expect, it } from "vitest";
import { DEFAULT_PUSH_SERVICE_HOSTS, endpointProblem, isBlockedAddress, parseHostList } from "@/lib/server/push/push-policy";

const allow = { hosts: DEFAULT_PUSH_SERVICE_HOSTS, fakeOrigin: "https://127.0.0.1:4431" };

describe("addresses a push is never sent to", () => {
  // RFC 6890 special-purpose ranges; RFC 1918; RFC 6598; RFC 3927; RFC 4193; RFC 4291 §2.5.5.2.
  it.each([
    "127.0.0.1",
    "127.255.0.9",
    "10.0.0.1",
    "172.16.4.4",
    "172.31.255.255",
    "192.168.1.1",
    "169.254.169.254",
    "100.64.0.1",
    "0.0.0.0",
    "224.0.0.1",
    "::1",
    "::",
    "fc00::1",
    "fd12:3456::1",
    "fe80::1",
    "::ffff:127.0.0.1",
    "::ffff:10.0.0.1",
    "::ffff:a9fe:a9fe",
    "64:ff9b::7f00:1",
    "2002:7f00:1::",
    "2002:c0a8:101::1",
    "not-an-address",
  ])("%s is refused", (a) => expect(isBlockedAddress(a)).toBe(true));

  it.each(["142.250.74.10", "17.57.146.20", "8.8.8.8", "172.32.0.1", "2a00:1450:4009:81f::200a", "::ffff:8.8.8.8", "2002:808:808::1"])(
    "%s is a public address",
    (a) => expect(isBlockedAddress(a)).toBe(false),
  );
});

describe("push endpoints a subscription may name", () => {
  it("accepts the browsers' push services, and any name below a wildcard entry", () => {
    for (const e of [
      "https://fcm.googleapis.com/fcm/send/abc",
      "https://updates.push.services.mozilla.com/wpush/v2/abc",
      "https://web.push.apple.com/QGx",
      "https://api.push.apple.com/3/device/x",
      "https://wns2-par02p.notify.windows.com/w/?token=abc",
      "https://FCM.googleapis.com./fcm/send/abc",
      "https://127.0.0.1:4431/push/abc", // the configured fake
    ])
      expect(endpointProblem(e, allow), e).toBeNull();
  });

  it("refuses other hosts, a wildcard's bare domain, plain http, credentials and the fake's host on another port", () => {
    expect(endpointProblem("https://push.apple.com/x", allow)).toMatch(/not a browser push service/);
    expect(endpointProblem("https://fcm.googleapis.com.evil.example/x", allow)).toMatch(/not a browser push service/);
    expect(endpointProblem("https://evilnotify.windows.com/x", allow)).toMatch(/not a browser push service/);
    expect(endpointProblem("http://fcm.googleapis.com/fcm/send/abc", allow)).toBe("Push endpoints use https.");
    expect(endpointProblem("https://a:b@fcm.googleapis.com/fcm/send/abc", allow)).toMatch(/user name or password/);
    expect(endpointProblem("https://127.0.0.1:4432/push/abc", allow)).toMatch(/127\.0\.0\.1 is not/);
    expect(endpointProblem("not a url", allow)).toBe("The push endpoint must be a URL.");
  });

  it("refuses a private address even when the list names it", () => {
    expect(endpointProblem("https://10.0.0.7/push", { hosts: ["10.0.0.7"] })).toMatch(/private network/);
    expect(endpointProblem("https://[::1]/push", { hosts: ["[::1]"] })).toMatch(/private network/);
  });

  it("reads PUSH_SERVICE_HOSTS as a comma-separated list, the browsers' services when empty", () => {
    expect(parseHostList(undefined)).toEqual(DEFAULT_PUSH_SERVICE_HOSTS);
    expect(parseHostList(" ")).toEqual(DEFAULT_PUSH_SERVICE_HOSTS);
    expect(parseHostList("Push.Example.net., *.svc.example")).toEqual(["push.example.net", "*.svc.example"]);
  });
});
