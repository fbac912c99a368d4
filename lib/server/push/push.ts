import https from "node:https";
import createDebug from "debug";
import webpush from "web-push";
import { BlockedAddressError, endpointProblem, guardedLookup, isFakeOrigin, type PushAllowList } from "@/lib/server/push/push-policy";

const log = createDebug("wormward:push");

export interface PushSubscriptionJson {
  endpoint: string;
  keys: { p256dh: string; auth: string };
}

export interface VapidKeys {
  publicKey: string;
  privateKey: string;
}

export interface SendPushOptions {
  vapid: VapidKeys & { subject: string };
  allow: PushAllowList;
  // The CA of the local fake push service; used for the fake's origin only.
  ca?: string;
  ttl?: number;
  urgency?: "very-low" | "low" | "normal" | "high";
  topic?: string;
  timeoutMs?: number;
}

// status is null when no HTTP answer came back (refused address, connection, TLS failure, timeout).
// `reason` is always in our own words: a push service's answer body is never passed on or stored.
export type SendPushResult =
  { ok: true; status: number } | { ok: false; gone: boolean; retry: boolean; status: number | null; reason: string; retryAfterMs?: number };

export const DEFAULT_PUSH_TTL = 24 * 60 * 60;
// web-push sets no timeout of its own; a push service that never answers would hold a send forever.
export const DEFAULT_PUSH_TIMEOUT_MS = 10_000;

export function makeVapidKeys(): VapidKeys {
  return webpush.generateVAPIDKeys();
}

// Agents keep TLS sessions alive across an alert's fan-out. Real push services get the guarded
// DNS lookup; the fake gets its own CA and no address check (it lives on 127.0.0.1 by design).
let publicAgent: https.Agent | null = null;
const fakeAgents = new Map<string, https.Agent>();
function agentFor(fake: boolean, ca: string | undefined): https.Agent {
  if (fake && ca) {
    let agent = fakeAgents.get(ca);
    if (!agent) fakeAgents.set(ca, (agent = new https.Agent({ ca, keepAlive: true })));
    return agent;
  }
  return (publicAgent ??= new https.Agent({ keepAlive: true, lookup: guardedLookup }));
}

function statusWords(status: number): string {
  if (status === 404 || status === 410) return "the push service says this phone's subscription has ended";
  if (status === 413) return "the push service found the message too large";
  if (status === 429) return "the push service asked us to slow down";
  if (status === 401 || status === 403) return "the push service did not accept our server's signature";
  if (status >= 500) return "the push service had a problem on its side";
  return "the push service refused the message";
}

function retryAfter(headers: Record<string, unknown> | undefined): number | undefined {
  const value = headers?.["retry-after"];
  if (typeof value !== "string") return undefined;
  const seconds = Number(value);
  if (Number.isFinite(seconds)) return Math.max(0, seconds * 1000);
  const at = Date.parse(value); // RFC 9110 §10.2.3: delay-seconds or an HTTP-date
  return Number.isFinite(at) ? Math.max(0, at - Date.now()) : undefined;
}

export async function sendPush(subscription: PushSubscriptionJson, payload: string | object, options: SendPushOptions): Promise<SendPushResult> {
  const origin = safeOrigin(subscription.endpoint);
  const problem = endpointProblem(subscription.endpoint, options.allow);
  if (problem) {
    log("push to %s refused before sending: %s", origin, problem);
    return { ok: false, gone: false, retry: false, status: null, reason: "this push endpoint is not one we send to" };
  }
  const fake = isFakeOrigin(subscription.endpoint, options.allow);
  const timeoutMs = options.timeoutMs ?? DEFAULT_PUSH_TIMEOUT_MS;
  let timer: NodeJS.Timeout | undefined;
  try {
    const send = webpush.sendNotification(subscription, typeof payload === "string" ? payload : JSON.stringify(payload), {
      vapidDetails: options.vapid,
      TTL: options.ttl ?? DEFAULT_PUSH_TTL,
      contentEncoding: "aes128gcm",
      // The socket's idle timeout; the deadline below also bounds a service that answers drop by drop.
      timeout: timeoutMs,
      ...(options.urgency ? { urgency: options.urgency } : {}),
      ...(options.topic ? { topic: options.topic } : {}),
      agent: agentFor(fake, options.ca),
    });
    const deadline = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error("Socket timeout")), timeoutMs + 1_000);
    });
    const result = await Promise.race([send, deadline]);
    log("push to %s accepted (%d)", origin, result.statusCode);
    return { ok: true, status: result.statusCode };
  } catch (error) {
    if (error instanceof webpush.WebPushError) {
      // RFC 8030 §7.3 answers 404 for an expired subscription; deployed services answer 410: either way the caller drops it.
      const gone = error.statusCode === 404 || error.statusCode === 410;
      const retry = error.statusCode === 429 || error.statusCode >= 500;
      const reason = statusWords(error.statusCode);
      log("push to %s answered %d%s", origin, error.statusCode, gone ? " (gone)" : "");
      const after = retryAfter(error.headers as Record<string, unknown>);
      return { ok: false, gone, retry, status: error.statusCode, reason, ...(after === undefined ? {} : { retryAfterMs: after }) };
    }
    // An IP literal never goes through the lookup; endpointProblem refused private ones above.
    if (error instanceof BlockedAddressError || (error as { code?: string }).code === "WORMWARD_BLOCKED_ADDRESS") {
      log("push to %s refused: %s", origin, (error as Error).message);
      return { ok: false, gone: false, retry: false, status: null, reason: "the push service's name points inside a private network" };
    }
    const message = error instanceof Error ? error.message : String(error);
    const timedOut = /timeout/i.test(message);
    log("push to %s failed: %s", origin, message);
    const reason = timedOut ? `no answer from the push service within ${Math.round(timeoutMs / 100) / 10} s` : "could not reach the push service";
    return { ok: false, gone: false, retry: true, status: null, reason };
  } finally {
    clearTimeout(timer);
  }
}

// Log only the push service's origin: anyone holding the full endpoint can send to it.
function safeOrigin(endpoint: string): string {
  try {
    return new URL(endpoint).origin;
  } catch {
    return "(bad endpoint)";
  }
}
