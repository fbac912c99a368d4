// A local Web Push service (RFC 8030) that checks what a real one checks and keeps what it receives.
import { execFile } from "node:child_process";
import { createPublicKey, randomBytes, verify } from "node:crypto";
import { realpathSync } from "node:fs";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { createServer, type Server } from "node:https";
import type { IncomingMessage, ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { promisify } from "node:util";
import createDebug from "debug";

const log = createDebug("wormward:fake-push");
const run = promisify(execFile);

// RFC 8030 §7.2: no 413 for bodies of 4096 octets or less; RFC 8291 §4 keeps Web Push bodies within that.
export const MAX_PUSH_BODY = 4096;
const MAX_TOKEN_LIFETIME = 24 * 60 * 60; // RFC 8292: exp no more than 24 h ahead

export interface VapidClaims {
  aud: string;
  exp: number;
  sub?: string;
}

export type Check<T> = { ok: true; value: T } | { ok: false; status: number; reason: string };

export interface PushMessage {
  id: string;
  subscriptionId: string;
  receivedAt: string;
  headers: { ttl: number; urgency: string; topic: string | null; contentEncoding: string; contentLength: number };
  body: string; // base64url of the encrypted body, as received
  vapid: { key: string; claims: VapidClaims };
}

// How a subscription's push resource behaves: like a push service, never answering (a service
// that hangs), or answering every push with a fixed status and body (one that says too much).
export type SubscriptionMode = { kind: "normal" } | { kind: "never-answers" } | { kind: "answers"; status: number; body: string };

export interface PushService {
  url: string;
  port: number;
  ca: string;
  close(): Promise<void>;
  messages(subscriptionId?: string): PushMessage[];
  clear(): void;
  subscriptionEndpoint(id?: string, mode?: SubscriptionMode): string;
  expire(id: string): void;
  // Push requests that reached a subscription's resource, answered or not.
  attempts(id: string): number;
}

function parseMode(body: Buffer | null): SubscriptionMode {
  try {
    const m = JSON.parse(body?.toString("utf8") || "{}") as { mode?: string; status?: number; body?: string };
    if (m.mode === "never-answers") return { kind: "never-answers" };
    if (m.mode === "answers" && Number.isInteger(m.status) && m.status! >= 200 && m.status! <= 599) {
      return { kind: "answers", status: m.status!, body: String(m.body ?? "") };
    }
  } catch {
    /* a bare subscribe request */
  }
  return { kind: "normal" };
}

const fail = (status: number, reason: string) => ({ ok: false, status, reason }) as const;

function decodeJson(part: string): unknown {
  try {
    return JSON.parse(Buffer.from(part, "base64url").toString("utf8"));
  } catch {
    return undefined;
  }
}

// RFC 8292: t is a JWS signed with ES256 by the key in k (P-256, X9.62 uncompressed, base64url).
export function verifyVapidToken(token: string, key: string): Check<VapidClaims> {
  const point = Buffer.from(key, "base64url");
  if (point.length !== 65 || point[0] !== 0x04) return fail(403, "k is not an uncompressed P-256 public key");
  const parts = token.split(".");
  const [head, body, sig] = parts;
  if (parts.length !== 3 || head === undefined || body === undefined || sig === undefined) {
    return fail(403, "t is not a compact JWS");
  }
  const header = decodeJson(head) as { alg?: unknown } | undefined;
  if (header?.alg !== "ES256") return fail(403, "JWS alg must be ES256");
  const signature = Buffer.from(sig, "base64url");
  if (signature.length !== 64) return fail(403, "ES256 signature must be 64 octets (RFC 7518 §3.4)");
  let valid = false;
  try {
    const publicKey = createPublicKey({
      key: {
        kty: "EC",
        crv: "P-256",
        x: point.subarray(1, 33).toString("base64url"),
        y: point.subarray(33).toString("base64url"),
      },
      format: "jwk",
    });
    valid = verify("sha256", Buffer.from(`${head}.${body}`), { key: publicKey, dsaEncoding: "ieee-p1363" }, signature);
  } catch {
    return fail(403, "k is not a point on P-256");
  }
  if (!valid) return fail(403, "JWS signature does not verify with k");
  const claims = decodeJson(body) as Record<string, unknown> | undefined;
  if (!claims || typeof claims.aud !== "string" || typeof claims.exp !== "number") {
    return fail(403, "JWT claims must hold aud (string) and exp (number)");
  }
  if (claims.sub !== undefined && typeof claims.sub !== "string") return fail(403, "sub must be a string");
  return { ok: true, value: { aud: claims.aud, exp: claims.exp, ...(claims.sub === undefined ? {} : { sub: claims.sub }) } };
}

// RFC 8292: aud is the push resource's origin, exp is required and at most 24 h ahead, sub a mailto:/https: URI.
export function checkVapidClaims(claims: VapidClaims, audience: string, nowSeconds = Date.now() / 1000): Check<VapidClaims> {
  let aud: string;
  try {
    aud = new URL(claims.aud).origin;
  } catch {
    return fail(403, "aud is not a URL");
  }
  if (aud !== new URL(audience).origin || claims.aud.replace(/\/$/, "") !== aud) {
    return fail(403, `aud must be the push resource origin ${new URL(audience).origin}`);
  }
  if (claims.exp <= nowSeconds) return fail(403, "JWT has expired");
  if (claims.exp > nowSeconds + MAX_TOKEN_LIFETIME) return fail(403, "exp is more than 24 hours ahead");
  if (claims.sub !== undefined && !/^(mailto:|https:)/.test(claims.sub)) return fail(403, "sub must be a mailto: or https: URI");
  return { ok: true, value: claims };
}

// RFC 8292: Authorization: vapid t=<JWT>, k=<key>; 401 without credentials, 403 for bad ones.
export function checkVapidAuthorization(
  header: string | undefined,
  audience: string,
  nowSeconds = Date.now() / 1000,
): Check<{ key: string; claims: VapidClaims }> {
  const match = header?.match(/^\s*vapid\s+(.*)$/i);
  if (!match?.[1]) return fail(401, "Authorization: vapid t=..., k=... required");
  const params = new Map<string, string>();
  for (const pair of match[1].split(",")) {
    const eq = pair.indexOf("=");
    if (eq > 0)
      params.set(
        pair.slice(0, eq).trim().toLowerCase(),
        pair
          .slice(eq + 1)
          .trim()
          .replace(/^"(.*)"$/, "$1"),
      );
  }
  const t = params.get("t");
  const k = params.get("k");
  if (!t || !k) return fail(401, "vapid credentials need both t and k");
  const token = verifyVapidToken(t, k);
  if (!token.ok) return token;
  const claims = checkVapidClaims(token.value, audience, nowSeconds);
  return claims.ok ? { ok: true, value: { key: k, claims: claims.value } } : claims;
}

// RFC 8188 §2.1 header (salt 16, rs uint32, idlen, keyid) with RFC 8291 §4's Web Push constraints.
export function checkAes128gcmBody(body: Buffer): Check<{ rs: number; keyid: Buffer }> {
  if (body.length > MAX_PUSH_BODY) return fail(413, `body exceeds ${MAX_PUSH_BODY} octets`);
  if (body.length < 21) return fail(400, "body too short for an aes128gcm header");
  const rs = body.readUInt32BE(16);
  const idlen = body[20] ?? 0;
  if (rs < 18) return fail(400, "rs must be at least 18");
  if (idlen !== 65) return fail(400, "idlen must be 65 (the sender's P-256 public key)");
  const keyid = body.subarray(21, 86);
  if (keyid.length !== 65 || keyid[0] !== 0x04) return fail(400, "keyid is not an uncompressed P-256 point");
  const records = body.length - 86;
  if (records < 17) return fail(400, "no record: need a padding delimiter and a 16-octet tag");
  // RFC 8291 §4: a single record, so rs must exceed the ciphertext length.
  if (records >= rs) return fail(400, "push messages must fit in a single record");
  return { ok: true, value: { rs, keyid } };
}

// RFC 8030 §5.2–5.4: TTL is required; Urgency and Topic have fixed shapes.
function checkHeaders(req: IncomingMessage): Check<{ ttl: number; urgency: string; topic: string | null }> {
  const ttl = req.headers.ttl;
  if (typeof ttl !== "string" || !/^\d+$/.test(ttl.trim())) return fail(400, "TTL header required (RFC 8030 §5.2)");
  const urgency = (req.headers.urgency as string | undefined)?.trim() ?? "normal";
  if (!["very-low", "low", "normal", "high"].includes(urgency)) {
    return fail(400, "Urgency must be one of very-low, low, normal, high");
  }
  const topic = (req.headers.topic as string | undefined)?.trim() ?? null;
  if (topic !== null && !/^[A-Za-z0-9_-]{1,32}$/.test(topic)) return fail(400, "Topic must be 1-32 base64url characters");
  return { ok: true, value: { ttl: Number(ttl), urgency, topic } };
}

async function makeCertificate(): Promise<{ key: string; cert: string }> {
  const dir = await mkdtemp(path.join(tmpdir(), "wormward-push-"));
  try {
    const keyFile = path.join(dir, "key.pem");
    const certFile = path.join(dir, "cert.pem");
    await run("openssl", [
      "req",
      "-x509",
      "-newkey",
      "ec",
      "-pkeyopt",
      "ec_paramgen_curve:prime256v1",
      "-nodes",
      "-keyout",
      keyFile,
      "-out",
      certFile,
      "-days",
      "30",
      "-subj",
      "/CN=wormward fake push service",
      "-addext",
      "subjectAltName=IP:127.0.0.1,DNS:localhost",
    ]);
    return { key: await readFile(keyFile, "utf8"), cert: await readFile(certFile, "utf8") };
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

function readBody(req: IncomingMessage): Promise<Buffer | null> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    req.on("data", (chunk: Buffer) => {
      size += chunk.length;
      // Keep reading past the limit only to answer 413 rather than reset the connection.
      if (size <= MAX_PUSH_BODY + 1) chunks.push(chunk);
    });
    req.on("end", () => resolve(size > MAX_PUSH_BODY ? null : Buffer.concat(chunks)));
    req.on("error", reject);
  });
}

function answer(res: ServerResponse, status: number, body?: unknown, headers: Record<string, string> = {}): void {
  const text = body === undefined ? "" : typeof body === "string" ? body : JSON.stringify(body);
  res.writeHead(status, {
    ...headers,
    ...(text ? { "content-type": typeof body === "string" ? "text/plain; charset=utf-8" : "application/json" } : {}),
  });
  res.end(text);
}

export async function startPushService(options: { port?: number; host?: string } = {}): Promise<PushService> {
  const host = options.host ?? "127.0.0.1";
  const { key, cert } = await makeCertificate();
  const subscriptions = new Map<string, "active" | "expired">();
  const modes = new Map<string, SubscriptionMode>();
  const tries = new Map<string, number>();
  let kept: PushMessage[] = [];
  let origin = "";

  async function receive(id: string, req: IncomingMessage, res: ServerResponse): Promise<void> {
    const state = subscriptions.get(id);
    tries.set(id, (tries.get(id) ?? 0) + 1);
    const mode = modes.get(id) ?? { kind: "normal" };
    if (mode.kind === "never-answers") {
      log("holding push to %s without an answer", id);
      req.resume();
      return;
    }
    const body = await readBody(req);
    if (mode.kind === "answers") return answer(res, mode.status, mode.body);
    const refuse = (status: number, reason: string, extra: Record<string, string> = {}) => {
      log("refused push to %s: %d %s", id, status, reason);
      answer(res, status, reason, extra);
    };
    if (state === undefined) return refuse(404, "no such subscription");
    // RFC 8030 §7.3 says 404 for an expired subscription; deployed services answer 410 Gone, which the app must handle too.
    if (state === "expired") return refuse(410, "subscription expired");
    const auth = checkVapidAuthorization(req.headers.authorization, origin);
    if (!auth.ok) return refuse(auth.status, auth.reason, auth.status === 401 ? { "www-authenticate": "vapid" } : {});
    const headers = checkHeaders(req);
    if (!headers.ok) return refuse(headers.status, headers.reason);
    if (body === null) return refuse(413, `body exceeds ${MAX_PUSH_BODY} octets`);
    const encoding = req.headers["content-encoding"]?.trim().toLowerCase();
    if (encoding !== "aes128gcm") return refuse(400, "Content-Encoding must be aes128gcm (RFC 8291 §4)");
    const coding = checkAes128gcmBody(body);
    if (!coding.ok) return refuse(coding.status, coding.reason);
    // RFC 8292: reusing the VAPID key as the encryption key SHOULD be refused.
    if (coding.value.keyid.toString("base64url") === auth.value.key) return refuse(400, "VAPID key reused as ECDH key");
    const message: PushMessage = {
      id: randomBytes(12).toString("base64url"),
      subscriptionId: id,
      receivedAt: new Date().toISOString(),
      headers: { ...headers.value, contentEncoding: encoding, contentLength: body.length },
      body: body.toString("base64url"),
      vapid: auth.value,
    };
    kept.push(message);
    log("kept push %s for %s (%d octets, ttl %d)", message.id, id, body.length, message.headers.ttl);
    // RFC 8030 §5: 201 with the push message resource in Location.
    answer(res, 201, undefined, { location: `${origin}/message/${message.id}`, ttl: String(message.headers.ttl) });
  }

  async function handle(req: IncomingMessage, res: ServerResponse): Promise<void> {
    const url = new URL(req.url ?? "/", origin);
    const push = url.pathname.match(/^\/push\/([A-Za-z0-9_-]+)$/);
    if (push?.[1] && req.method === "POST") return receive(push[1], req, res);
    if (url.pathname === "/messages" && req.method === "GET") {
      const sub = url.searchParams.get("subscription");
      return answer(res, 200, sub ? kept.filter((m) => m.subscriptionId === sub) : kept);
    }
    if (url.pathname === "/attempts" && req.method === "GET") {
      return answer(res, 200, { attempts: tries.get(url.searchParams.get("subscription") ?? "") ?? 0 });
    }
    if (url.pathname === "/messages" && req.method === "DELETE") {
      kept = [];
      return answer(res, 204);
    }
    // RFC 8030 §4: a subscribe request yields the subscription and its push resource (Link rel=urn:ietf:params:push).
    // The request body may ask for a behaviour: {"mode":"never-answers"} or {"mode":"answers","status":500,"body":"..."}.
    if (url.pathname === "/subscribe" && req.method === "POST") {
      const endpoint = service.subscriptionEndpoint(undefined, parseMode(await readBody(req)));
      const id = endpoint.slice(endpoint.lastIndexOf("/") + 1);
      return answer(
        res,
        201,
        { endpoint },
        {
          location: `${origin}/subscription/${id}`,
          link: `<${endpoint}>; rel="urn:ietf:params:push"`,
        },
      );
    }
    // RFC 8030 §7.3: the user agent deletes its subscription; later pushes to it answer 410 Gone.
    const sub = url.pathname.match(/^\/subscription\/([A-Za-z0-9_-]+)$/);
    if (sub?.[1] && req.method === "DELETE") {
      if (!subscriptions.has(sub[1])) return answer(res, 404, "no such subscription");
      service.expire(sub[1]);
      return answer(res, 204);
    }
    answer(res, 404, "not found");
  }

  const server: Server = createServer({ key, cert }, (req, res) => {
    handle(req, res).catch((error: unknown) => {
      log("request failed: %s", error instanceof Error ? error.message : String(error));
      if (!res.headersSent) answer(res, 500, "internal error");
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port ?? 0, host, () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  origin = `https://${host.includes(":") ? `[${host}]` : host}:${port}`;
  log("listening on %s", origin);

  const service: PushService = {
    url: origin,
    port,
    ca: cert,
    messages: (subscriptionId) => kept.filter((m) => subscriptionId === undefined || m.subscriptionId === subscriptionId).map((m) => structuredClone(m)),
    clear: () => {
      kept = [];
    },
    subscriptionEndpoint(id = randomBytes(16).toString("base64url"), mode) {
      if (!/^[A-Za-z0-9_-]+$/.test(id)) throw new Error("subscription id must be base64url characters");
      if (!subscriptions.has(id)) subscriptions.set(id, "active");
      if (mode) modes.set(id, mode);
      return `${origin}/push/${id}`;
    },
    attempts: (id) => tries.get(id) ?? 0,
    expire(id) {
      subscriptions.set(id, "expired");
      log("subscription %s expired", id);
    },
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.close((error) => (error ? reject(error) : resolve()));
        server.closeAllConnections();
        log("closed %s", origin);
      }),
  };
  return service;
}

function cliOption(name: string): string | undefined {
  const at = process.argv.indexOf(`--${name}`);
  return at > 0 ? process.argv[at + 1] : undefined;
}

// CLI: tsx fakes/push-service.ts --port 4431 [--host 127.0.0.1] [--ca-file path] [--subscription id]
if (process.argv[1] && import.meta.url === pathToFileURL(realpathSync(process.argv[1])).href) {
  const service = await startPushService({ port: Number(cliOption("port") ?? 0), host: cliOption("host") });
  const caFile = cliOption("ca-file");
  if (caFile) await writeFile(caFile, service.ca);
  const sub = cliOption("subscription");
  console.log(`fake push service on ${service.url}${caFile ? ` (CA in ${caFile})` : ""}`);
  if (sub) console.log(`subscription endpoint ${service.subscriptionEndpoint(sub)}`);
  const stop = () => void service.close().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}
