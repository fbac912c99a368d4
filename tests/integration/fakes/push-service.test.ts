import { createECDH, randomBytes } from "node:crypto";
import https from "node:https";
import { createRequire } from "node:module";
import webpush from "web-push";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { startPushService, type PushService } from "@/fakes/push-service";
import { makeVapidKeys, sendPush, type PushSubscriptionJson, type SendPushOptions } from "@/lib/server/push/push";

// http_ece ships no type declarations; this is the one call the test makes.
type EceParams = { version: "aes128gcm"; privateKey: ReturnType<typeof createECDH>; authSecret: Buffer };
type EceDecrypt = (body: Buffer, params: EceParams) => Buffer;
const ece = createRequire(import.meta.url)("http_ece") as { decrypt: EceDecrypt };

let service: PushService;
let options: SendPushOptions;

function subscriber(endpoint: string) {
  const ecdh = createECDH("prime256v1");
  ecdh.generateKeys();
  const authSecret = randomBytes(16);
  const subscription: PushSubscriptionJson = {
    endpoint,
    keys: { p256dh: ecdh.getPublicKey("base64url"), auth: authSecret.toString("base64url") },
  };
  return { ecdh, authSecret, subscription };
}

// Sends a request that web-push builds, after the test has altered it, to see what the fake refuses.
function rawSend(url: string, headers: Record<string, string>, body: Buffer): Promise<{ status: number; text: string }> {
  return new Promise((resolve, reject) => {
    const req = https.request(url, { method: "POST", headers, ca: service.ca }, (res) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, text: Buffer.concat(chunks).toString("utf8") }));
    });
    req.on("error", reject);
    req.end(body);
  });
}

function requestFor(subscription: PushSubscriptionJson) {
  const details = webpush.generateRequestDetails(subscription, JSON.stringify({ kind: "heat" }), {
    vapidDetails: options.vapid,
    TTL: 60,
    contentEncoding: "aes128gcm",
  });
  return { headers: { ...details.headers } as Record<string, string>, body: details.body };
}

beforeAll(async () => {
  service = await startPushService();
  // This test's own fake is the one loopback push service allowed (lib/server/push/push-policy.ts).
  options = { vapid: { ...makeVapidKeys(), subject: "mailto:alerts@wormward.test" }, allow: { hosts: [], fakeOrigin: service.url }, ca: service.ca, ttl: 600 };
});

afterAll(async () => {
  await service.close();
});

beforeEach(() => service.clear());

describe("fake push service with lib/server/push/push.ts", () => {
  it("keeps a push from sendPush and its body decrypts to the JSON sent", async () => {
    const { ecdh, authSecret, subscription } = subscriber(service.subscriptionEndpoint());
    const payload = { kind: "heat", level: "act now", bin: "Bin 2", zone: "fresh", temperatureC: 31.5, risePerHourC: 2.1 };

    expect(await sendPush(subscription, payload, { ...options, urgency: "high" })).toEqual({ ok: true, status: 201 });

    const id = subscription.endpoint.split("/").pop();
    const [kept, ...rest] = service.messages(id);
    expect(rest).toHaveLength(0);
    if (!kept) throw new Error("no message kept");
    expect(kept.headers).toMatchObject({ ttl: 600, urgency: "high", contentEncoding: "aes128gcm" });
    expect(kept.vapid.key).toBe(options.vapid.publicKey);
    expect(kept.vapid.claims).toMatchObject({ aud: service.url, sub: "mailto:alerts@wormward.test" });
    const plain = ece.decrypt(Buffer.from(kept.body, "base64url"), { version: "aes128gcm", privateKey: ecdh, authSecret });
    expect(JSON.parse(plain.toString("utf8"))).toEqual(payload);
  });

  it("lists kept messages over GET /messages and clears them with DELETE /messages", async () => {
    const { subscription } = subscriber(service.subscriptionEndpoint());
    await sendPush(subscription, "hello", options);
    const agent = new https.Agent({ ca: service.ca });
    const listed = (await fetchJson(`${service.url}/messages`, agent)) as { subscriptionId: string }[];
    expect(listed.map((m) => m.subscriptionId)).toEqual([subscription.endpoint.split("/").pop()]);
    await new Promise<void>((resolve, reject) =>
      https
        .request(`${service.url}/messages`, { method: "DELETE", agent }, (res) => (res.resume(), resolve()))
        .on("error", reject)
        .end(),
    );
    expect(service.messages()).toEqual([]);
    agent.destroy();
  });

  it("refuses a push whose VAPID signature does not match k with 403", async () => {
    const { subscription } = subscriber(service.subscriptionEndpoint());
    const other = makeVapidKeys();
    const result = await sendPush(subscription, "x", { ...options, vapid: { ...options.vapid, privateKey: other.privateKey } });
    // The status and our own words; the fake's answer ("JWS signature does not verify with k") stays out.
    expect(result).toEqual({ ok: false, gone: false, retry: false, status: 403, reason: "the push service did not accept our server's signature" });
    expect(service.messages()).toEqual([]);
  });

  it("refuses a push without a TTL header with 400", async () => {
    const { subscription } = subscriber(service.subscriptionEndpoint());
    const { headers, body } = requestFor(subscription);
    delete headers.TTL;
    const answer = await rawSend(subscription.endpoint, headers, body);
    expect(answer).toMatchObject({ status: 400, text: expect.stringMatching(/TTL/) });
    expect(service.messages()).toEqual([]);
  });

  it("answers 401 without Authorization and 403 for a token made for another origin", async () => {
    const { subscription } = subscriber(service.subscriptionEndpoint());
    const { headers, body } = requestFor(subscription);
    const { Authorization: _dropped, ...noAuth } = headers;
    expect((await rawSend(subscription.endpoint, noAuth, body)).status).toBe(401);
    const elsewhere = webpush.getVapidHeaders(
      "https://push.example.net",
      options.vapid.subject,
      options.vapid.publicKey,
      options.vapid.privateKey,
      "aes128gcm",
    );
    const wrongAud = await rawSend(subscription.endpoint, { ...headers, Authorization: elsewhere.Authorization }, body);
    expect(wrongAud).toMatchObject({ status: 403, text: expect.stringMatching(/aud/) });
  });

  it("refuses a body over 4096 octets with 413", async () => {
    const { subscription } = subscriber(service.subscriptionEndpoint());
    const { headers } = requestFor(subscription);
    const big = randomBytes(4097);
    expect((await rawSend(subscription.endpoint, { ...headers, "Content-Length": String(big.length) }, big)).status).toBe(413);
  });

  it("answers 410 for an expired subscription and sendPush reports it gone", async () => {
    const endpoint = service.subscriptionEndpoint("keeper-phone-1");
    const { subscription } = subscriber(endpoint);
    expect(await sendPush(subscription, "before", options)).toEqual({ ok: true, status: 201 });
    service.expire("keeper-phone-1");
    expect(await sendPush(subscription, "after", options)).toMatchObject({ ok: false, gone: true, status: 410 });
    expect(service.messages("keeper-phone-1")).toHaveLength(1);
  });

  it("answers 404 for an unknown subscription and sendPush reports it gone", async () => {
    const { subscription } = subscriber(`${service.url}/push/never-subscribed`);
    expect(await sendPush(subscription, "x", options)).toMatchObject({ ok: false, gone: true, status: 404 });
  });

  it("reports an unreachable push service as a failure that is not gone and worth retrying", async () => {
    const { subscription } = subscriber("https://127.0.0.1:1/push/nobody");
    const allow = { hosts: [], fakeOrigin: "https://127.0.0.1:1" };
    expect(await sendPush(subscription, "x", { ...options, allow })).toMatchObject({
      ok: false,
      gone: false,
      retry: true,
      status: null,
      reason: "could not reach the push service",
    });
  });
});

function fetchJson(url: string, agent: https.Agent): Promise<unknown> {
  return new Promise((resolve, reject) => {
    https
      .get(url, { agent }, (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("end", () => resolve(JSON.parse(Buffer.concat(chunks).toString("utf8"))));
      })
      .on("error", reject);
  });
}
