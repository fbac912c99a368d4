import { createECDH, randomBytes, type ECDH } from "node:crypto";
import fs from "node:fs";
import https from "node:https";
import { inject } from "vitest";

// Talks to the fake push service (self-signed for 127.0.0.1) trusting only its own CA.
export function pushRequest(
  method: string,
  urlPath: string,
  body?: unknown,
): Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: string }> {
  const url = new URL(urlPath, inject("pushServiceUrl"));
  return new Promise((resolve, reject) => {
    const req = https.request(url, { method, ca: fs.readFileSync(inject("pushCaFile")) }, (res) => {
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c) => (body += c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body }));
    });
    req.on("error", reject);
    req.end(body === undefined ? undefined : JSON.stringify(body));
  });
}

export type TestSubscriber = { json: { endpoint: string; keys: { p256dh: string; auth: string } }; ecdh: ECDH; authSecret: Buffer; id: string };

export type FakeMode = { mode: "never-answers" } | { mode: "answers"; status: number; body: string };

// A subscriber like a browser's: a P-256 key pair and a 16-octet auth secret (RFC 8291 §2). A mode
// makes the fake push service hang on, or answer with a fixed status and body, every push to it.
export async function newSubscriber(mode?: FakeMode): Promise<TestSubscriber> {
  const r = await pushRequest("POST", "/subscribe", mode);
  const endpoint = (JSON.parse(r.body) as { endpoint: string }).endpoint;
  const ecdh = createECDH("prime256v1");
  ecdh.generateKeys();
  const authSecret = randomBytes(16);
  return {
    json: { endpoint, keys: { p256dh: ecdh.getPublicKey().toString("base64url"), auth: authSecret.toString("base64url") } },
    ecdh,
    authSecret,
    id: endpoint.slice(endpoint.lastIndexOf("/") + 1),
  };
}

export async function pushMessagesFor(id: string): Promise<{ body: string; receivedAt: string }[]> {
  const r = await pushRequest("GET", `/messages?subscription=${encodeURIComponent(id)}`);
  const parsed = JSON.parse(r.body) as { messages?: { body: string; receivedAt: string }[] } | { body: string; receivedAt: string }[];
  return Array.isArray(parsed) ? parsed : (parsed.messages ?? []);
}

// Push requests the fake received for a subscription, answered or not.
export async function pushAttemptsFor(id: string): Promise<number> {
  const r = await pushRequest("GET", `/attempts?subscription=${encodeURIComponent(id)}`);
  return (JSON.parse(r.body) as { attempts: number }).attempts;
}
