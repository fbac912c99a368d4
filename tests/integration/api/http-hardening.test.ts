// HTTP hardening against the built app: changes from another site's page are refused, JSON must say
// it is JSON, every body is read with a cap (declared or chunked), and every response carries the
// security headers (OWASP HTTP Headers Cheat Sheet; CSP Level 3).
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { appUrl, signIn, type Session } from "../../helpers/app";
import { addMember, makeFarm, type TestFarm } from "../series/fixtures";

type ErrorBody = { error: { code: string; message: string; field?: string } };

let c: pg.Client;
let farm: TestFarm;
let owner: Session;
let ownerEmail: string;

const notesOf = async (binId: string) => Number((await c.query(`select count(*)::int as n from log_notes where bin_id = $1`, [binId])).rows[0].n);
const importsOf = async (farmId: string) => Number((await c.query(`select count(*)::int as n from imports where farm_id = $1`, [farmId])).rows[0].n);

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  farm = await makeFarm(c, { zones: ["fresh"] });
  ownerEmail = await addMember(c, farm.farmId, "owner", "hardening-pass-1");
  owner = await signIn(ownerEmail, "hardening-pass-1");
});

afterAll(async () => {
  await c.query(`delete from farms where id = $1`, [farm.farmId]);
  await c.query(`delete from users where email = $1`, [ownerEmail]);
  await c.end();
});

const noteBody = (text: string) => JSON.stringify({ zoneId: null, text });

describe("changes from another site", () => {
  it("a cross-origin POST with the session cookie is refused", async () => {
    const before = await notesOf(farm.binId);
    const attempts: Record<string, string>[] = [
      { origin: "https://evil.example" },
      // a page in a sandboxed frame, or after a cross-site redirect
      { origin: "null" },
      // the same host name on another port is another origin
      { origin: appUrl().replace(/:\d+$/, ":1") },
      // Fetch Metadata alone (a browser that sent no Origin)
      { "sec-fetch-site": "cross-site" },
    ];
    for (const h of attempts) {
      const res = await owner.fetch(`/api/bins/${farm.binId}/notes`, {
        method: "POST",
        headers: { "content-type": "application/json", ...h },
        body: noteBody("from evil"),
      });
      expect(res.status, JSON.stringify(h)).toBe(403);
      expect(((await res.json()) as ErrorBody).error).toMatchObject({ code: "forbidden", message: expect.stringContaining("another site") });
    }
    const patch = await owner.fetch(`/api/farms/${farm.farmId}`, {
      method: "PATCH",
      headers: { "content-type": "application/json", origin: "https://evil.example" },
      body: JSON.stringify({ name: "Taken over" }),
    });
    expect(patch.status).toBe(403);
    const del = await owner.fetch(`/api/bins/${farm.binId}`, { method: "DELETE", headers: { origin: "https://evil.example" } });
    expect(del.status).toBe(403);

    expect(await notesOf(farm.binId)).toBe(before);
    const still = await c.query(`select f.name, (select count(*)::int from bins where id = $2) as bins from farms f where f.id = $1`, [
      farm.farmId,
      farm.binId,
    ]);
    expect(still.rows[0].name).not.toBe("Taken over");
    expect(still.rows[0].bins).toBe(1);
    // Reading is not a change: a cross-site GET still answers (CORS keeps the answer from the page).
    expect((await owner.fetch(`/api/bins/${farm.binId}`, { headers: { origin: "https://evil.example" } })).status).toBe(200);
  });

  it("a same-origin POST is still accepted", async () => {
    const before = await notesOf(farm.binId);
    const own = await owner.fetch(`/api/bins/${farm.binId}/notes`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: new URL(appUrl()).origin, "sec-fetch-site": "same-origin" },
      body: noteBody("from our own page"),
    });
    expect(own.status).toBe(201);
    // A script or a probe sends no Origin at all.
    const script = await owner.fetch(`/api/bins/${farm.binId}/notes`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: noteBody("from a script"),
    });
    expect(script.status).toBe(201);
    expect(await notesOf(farm.binId)).toBe(before + 2);
  });
});

describe("bodies", () => {
  it("a JSON body sent as text/plain is refused with 415", async () => {
    const before = await notesOf(farm.binId);
    // text/plain and form types are what a page of another site may send without a preflight.
    for (const type of ["text/plain", "application/x-www-form-urlencoded", "multipart/form-data; boundary=x"]) {
      const res = await owner.fetch(`/api/bins/${farm.binId}/notes`, { method: "POST", headers: { "content-type": type }, body: noteBody("plain") });
      expect(res.status, type).toBe(415);
      expect(((await res.json()) as ErrorBody).error).toMatchObject({ code: "unsupported_media", message: expect.stringContaining("application/json") });
    }
    const none = await owner.fetch(`/api/bins/${farm.binId}/notes`, { method: "POST", body: new TextEncoder().encode(noteBody("untyped")) });
    expect(none.status).toBe(415);
    const ok = await owner.fetch(`/api/bins/${farm.binId}/notes`, {
      method: "POST",
      headers: { "content-type": "application/json; charset=utf-8" },
      body: noteBody("typed"),
    });
    expect(ok.status).toBe(201);
    expect(await notesOf(farm.binId)).toBe(before + 1);
  });

  it("a 10 MB JSON body is refused with 413", async () => {
    const before = await notesOf(farm.binId);
    const big = noteBody("x".repeat(10 * 1024 * 1024));
    const res = await owner.fetch(`/api/bins/${farm.binId}/notes`, { method: "POST", headers: { "content-type": "application/json" }, body: big });
    expect(res.status).toBe(413);
    expect(((await res.json()) as ErrorBody).error).toMatchObject({ code: "too_large", message: expect.stringContaining("at most 65536 bytes (64 KiB)") });
    expect(await notesOf(farm.binId)).toBe(before);
  });

  // Streams up to `total` bytes in 64 KiB chunks, without Content-Length (chunked transfer coding),
  // and counts how many the server had pulled when its answer came and a moment later.
  async function streamed(path: string, headers: Record<string, string>, total: number, head = new Uint8Array(0)) {
    let sent = 0;
    const chunk = new Uint8Array(64 * 1024).fill(0x61);
    const body = new ReadableStream<Uint8Array>({
      pull(ctrl) {
        if (sent === 0 && head.byteLength) {
          sent += head.byteLength;
          return ctrl.enqueue(head);
        }
        if (sent >= total) return ctrl.close();
        sent += chunk.byteLength;
        ctrl.enqueue(chunk);
      },
    });
    const abort = new AbortController();
    const res = await fetch(`${appUrl()}${path}`, {
      method: "POST",
      headers: { cookie: owner.cookie, ...headers },
      body,
      duplex: "half",
      signal: abort.signal,
    } as RequestInit);
    const atAnswer = sent;
    const answer = res.status === 413 ? ((await res.json()) as ErrorBody) : await res.text();
    // Still offering the rest: a server that went on reading (even to throw it away) would pull it.
    await new Promise((r) => setTimeout(r, 1500));
    const later = sent;
    abort.abort();
    return { status: res.status, answer, atAnswer, later };
  }

  it("a chunked 50 MB upload is refused before it is read", async () => {
    const MB = 1024 * 1024;
    const notesBefore = await notesOf(farm.binId);
    const boundary = "----wormward-test";
    const head = new TextEncoder().encode(
      `--${boundary}\r\nContent-Disposition: form-data; name="time"\r\n\r\nA\r\n--${boundary}\r\nContent-Disposition: form-data; name="value"\r\n\r\nB\r\n` +
        `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.csv"\r\nContent-Type: text/csv\r\n\r\ntime,value\r\n`,
    );
    const csv = await streamed(`/api/farms/${farm.farmId}/imports`, { "content-type": `multipart/form-data; boundary=${boundary}` }, 50 * MB, head);
    console.log(
      `[http-hardening] chunked 50 MB CSV upload: 413 after ${(csv.atAnswer / MB).toFixed(1)} MB pulled from the sender, ${(csv.later / MB).toFixed(1)} MB 1.5 s later (cap 10 MiB + 64 KiB)`,
    );
    expect(csv.status).toBe(413);
    expect(csv.answer).toMatchObject({ error: { code: "too_large", field: "file" } });
    // The cap plus what the sockets hold in flight; nowhere near the 50 MB offered.
    expect(csv.atAnswer).toBeLessThan(20 * MB);
    expect(csv.later).toBeLessThan(20 * MB);
    expect(await importsOf(farm.farmId)).toBe(0);

    const json = await streamed(`/api/bins/${farm.binId}/notes`, { "content-type": "application/json" }, 50 * MB);
    console.log(
      `[http-hardening] chunked 50 MB JSON body: 413 after ${(json.atAnswer / MB).toFixed(1)} MB pulled from the sender, ${(json.later / MB).toFixed(1)} MB 1.5 s later (cap 64 KiB)`,
    );
    expect(json.status).toBe(413);
    expect(json.later).toBeLessThan(10 * MB);
    expect(await notesOf(farm.binId)).toBe(notesBefore);
  });
});

describe("security headers", () => {
  const SECURITY = ["content-security-policy", "x-content-type-options", "referrer-policy", "strict-transport-security"];
  const head = async (path: string, init: RequestInit = {}) => {
    const res = await fetch(`${appUrl()}${path}`, { method: "HEAD", redirect: "manual", ...init });
    const lines = [...res.headers].filter(([k]) => SECURITY.includes(k)).map(([k, v]) => `${k}: ${v}`);
    console.log(`[http-hardening] HEAD ${path} → ${res.status}\n  ${lines.join("\n  ")}`);
    return res;
  };
  const directives = (csp: string) =>
    new Map(
      csp
        .split(";")
        .map((d) => d.trim().split(/\s+/))
        .map(([k, ...v]) => [k!, v]),
    );

  it("every response carries the security headers", async () => {
    const html = await (await fetch(`${appUrl()}/sign-in`)).text();
    const chunk = /<script[^>]+src="(\/_next\/static\/[^"]+\.js)"/.exec(html)?.[1];
    expect(chunk).toBeDefined();
    const paths = ["/", "/sign-in", "/api/farms", `/api/bins/${farm.binId}`, "/api/auth/session", "/api/no-such-route", "/sw.js", "/icon.svg", chunk!];
    const nonces = new Set<string>();
    for (const path of paths) {
      const res = await head(path);
      expect(res.headers.get("x-content-type-options"), path).toBe("nosniff");
      expect(res.headers.get("referrer-policy"), path).toBe("strict-origin-when-cross-origin");
      // Over plain http there is no HSTS (RFC 6797 §7.2).
      expect(res.headers.get("strict-transport-security"), path).toBeNull();
      const csp = directives(res.headers.get("content-security-policy") ?? "");
      expect(csp.get("frame-ancestors"), path).toEqual(["'none'"]);
      for (const [k, v] of csp) expect(v, `${path} ${k}`).not.toContain("'unsafe-eval'");
      if (path.startsWith("/api/")) {
        expect(csp.get("default-src"), path).toEqual(["'none'"]);
        expect(csp.get("script-src"), path).toBeUndefined();
        continue;
      }
      const script = csp.get("script-src")!;
      expect(script, path).toContain("'strict-dynamic'");
      expect(script, path).not.toContain("'unsafe-inline'");
      const nonce = script.find((s) => s.startsWith("'nonce-"));
      expect(nonce, path).toMatch(/^'nonce-[A-Za-z0-9+/]{22}==/);
      nonces.add(nonce!);
      expect(csp.get("style-src"), path).not.toContain("'unsafe-inline'");
      expect(csp.get("object-src"), path).toEqual(["'none'"]);
      expect(csp.get("base-uri"), path).toEqual(["'self'"]);
      expect(csp.get("form-action"), path).toEqual(["'self'"]);
      expect(csp.get("worker-src"), path).toEqual(["'self'"]);
    }
    // A fresh nonce for every response.
    expect(nonces.size).toBe(paths.filter((p) => !p.startsWith("/api/")).length);
    // The signed-in 404 page and an error answer carry them too.
    const missing = await head(`/farms/${farm.farmId}/no-such-page`, { headers: { cookie: owner.cookie } });
    expect(missing.status).toBe(404);
    expect(missing.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
    const refused = await fetch(`${appUrl()}/api/farms`, { method: "POST", headers: { cookie: owner.cookie, "content-type": "text/plain" }, body: "{}" });
    expect(refused.status).toBe(415);
    expect(refused.headers.get("x-content-type-options")).toBe("nosniff");
  });

  it("every script on a page carries the response's nonce, and no element carries a style attribute", async () => {
    for (const path of ["/sign-in", `/farms/${farm.farmId}`, `/farms/${farm.farmId}/zones/${farm.zones.fresh}`]) {
      const res = await fetch(`${appUrl()}${path}`, { headers: { cookie: owner.cookie } });
      expect(res.status, path).toBe(200);
      const nonce = /'nonce-([^']+)'/.exec(res.headers.get("content-security-policy")!)![1]!;
      const html = await res.text();
      const scripts = html.match(/<script\b[^>]*>/g) ?? [];
      expect(scripts.length, path).toBeGreaterThan(0);
      for (const tag of scripts) expect(tag, path).toContain(`nonce="${nonce}"`);
      for (const tag of html.match(/<style\b[^>]*>/g) ?? []) expect(tag, path).toContain(`nonce="${nonce}"`);
      expect(html, path).not.toMatch(/<[a-z][^>]*\sstyle="/i);
    }
  });

  it("HSTS is sent when the request came over https", async () => {
    for (const path of ["/sign-in", "/api/farms"]) {
      const res = await head(path, { headers: { "x-forwarded-proto": "https" } });
      expect(res.headers.get("strict-transport-security"), path).toBe("max-age=63072000; includeSubDomains");
    }
    const page = await fetch(`${appUrl()}/sign-in`, { method: "HEAD", headers: { "x-forwarded-proto": "https" } });
    expect(page.headers.get("content-security-policy")).toContain("upgrade-insecure-requests");
  });
});
