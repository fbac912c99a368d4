import { describe, expect, it } from "vitest";
import { capWords, readCappedBody } from "@/lib/web/api/body";
import { isCrossSiteChange } from "@/lib/web/api/same-origin";
import { pagePolicy } from "@/lib/web/api/security-headers";

const OURS = ["https://worms.example"];
const req = (method: string, headers: Record<string, string>) =>
  new Request("https://worms.example/api/bins", { method, headers: { host: "worms.example", ...headers } });

describe("isCrossSiteChange", () => {
  it("a POST from another origin is a cross-site change; from ours, or with no Origin, it is not", () => {
    expect(isCrossSiteChange(req("POST", { origin: "https://evil.example" }), OURS)).toBe(true);
    expect(isCrossSiteChange(req("POST", { origin: "https://worms.example" }), OURS)).toBe(false);
    // A probe or curl sends no Origin (Fetch: browsers add one to every cross-origin POST).
    expect(isCrossSiteChange(req("POST", {}), OURS)).toBe(false);
  });

  it("PUT, PATCH and DELETE are checked as POST is; GET and HEAD are not changes", () => {
    for (const m of ["PUT", "PATCH", "DELETE"]) expect(isCrossSiteChange(req(m, { origin: "https://evil.example" }), OURS), m).toBe(true);
    for (const m of ["GET", "HEAD"]) expect(isCrossSiteChange(req(m, { origin: "https://evil.example" }), OURS), m).toBe(false);
  });

  it("Origin null, an unparseable Origin and Sec-Fetch-Site: cross-site are refused", () => {
    expect(isCrossSiteChange(req("POST", { origin: "null" }), OURS)).toBe(true);
    expect(isCrossSiteChange(req("POST", { origin: "not a url" }), OURS)).toBe(true);
    expect(isCrossSiteChange(req("POST", { "sec-fetch-site": "cross-site" }), OURS)).toBe(true);
    expect(isCrossSiteChange(req("POST", { "sec-fetch-site": "same-origin", origin: "https://worms.example" }), OURS)).toBe(false);
  });

  it("the app reached by its own host under another name than APP_URL is ours", () => {
    const lan = new Request("http://192.168.1.20:3000/api/bins", {
      method: "POST",
      headers: { host: "192.168.1.20:3000", origin: "http://192.168.1.20:3000" },
    });
    expect(isCrossSiteChange(lan, OURS)).toBe(false);
    const other = new Request("http://192.168.1.20:3000/api/bins", {
      method: "POST",
      headers: { host: "192.168.1.20:3000", origin: "http://192.168.1.20:8080" },
    });
    expect(isCrossSiteChange(other, OURS)).toBe(true);
  });
});

describe("readCappedBody", () => {
  // A body of `total` bytes offered in 1 KiB chunks, counting what the reader pulled.
  function offered(total: number) {
    const counter = { pulled: 0 };
    const body = new ReadableStream<Uint8Array>(
      {
        pull(ctrl) {
          if (counter.pulled >= total) return ctrl.close();
          counter.pulled += 1024;
          ctrl.enqueue(new Uint8Array(1024));
        },
      },
      { highWaterMark: 0 },
    );
    return { counter, req: new Request("http://x/", { method: "POST", body, duplex: "half" } as RequestInit) };
  }

  it("a chunked body over the cap stops being read just past the cap", async () => {
    const { counter, req } = offered(50 * 1024 * 1024);
    const r = await readCappedBody(req, 8 * 1024);
    expect(r).toEqual({ ok: false, size: "more than 8192 bytes" });
    expect(counter.pulled).toBeLessThanOrEqual(16 * 1024);
  });

  it("a declared length over the cap is refused before a byte is read", async () => {
    const body = new ReadableStream<Uint8Array>({
      pull() {
        throw new Error("read");
      },
    });
    const r = await readCappedBody(
      new Request("http://x/", { method: "POST", body, duplex: "half", headers: { "content-length": "10485760" } } as RequestInit),
      65536,
    );
    expect(r).toEqual({ ok: false, size: "10485760 bytes" });
  });

  it("a body within the cap is read whole", async () => {
    const { req } = offered(4 * 1024);
    const r = await readCappedBody(req, 8 * 1024);
    expect(r.ok && r.bytes.byteLength).toBe(4 * 1024);
  });

  it("caps are said in bytes and in KiB or MiB", () => {
    expect(capWords(65536)).toBe("65536 bytes (64 KiB)");
    expect(capWords(10 * 1024 * 1024 + 64 * 1024)).toBe("10551296 bytes (10.1 MiB)");
  });
});

describe("pagePolicy", () => {
  it("scripts and styles need the nonce; nothing is eval'd, framed or posted elsewhere", () => {
    const p = pagePolicy("abc", { https: false });
    expect(p).toContain("script-src 'self' 'nonce-abc' 'strict-dynamic'");
    expect(p).toContain("style-src 'self' 'nonce-abc'");
    for (const d of ["frame-ancestors 'none'", "object-src 'none'", "base-uri 'self'", "form-action 'self'", "worker-src 'self'"]) expect(p).toContain(d);
    expect(p).not.toContain("unsafe");
    expect(p).not.toContain("upgrade-insecure-requests");
    expect(pagePolicy("abc", { https: true })).toContain("upgrade-insecure-requests");
  });
});
