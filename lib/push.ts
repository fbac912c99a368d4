import https from "node:https";
import createDebug from "debug";
import webpush from "web-push";

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
  ca?: string;
  ttl?: number;
  urgency?: "very-low" | "low" | "normal" | "high";
  topic?: string;
}

// status is null when no HTTP answer came back (refused connection, TLS failure, timeout).
export type SendPushResult = { ok: true } | { ok: false; gone: boolean; status: number | null; message: string };

export const DEFAULT_PUSH_TTL = 24 * 60 * 60;

export function makeVapidKeys(): VapidKeys {
  return webpush.generateVAPIDKeys();
}

// One agent per CA keeps TLS sessions alive across an alert's fan-out instead of one per message.
const agents = new Map<string, https.Agent>();
function agentFor(ca: string): https.Agent {
  let agent = agents.get(ca);
  if (!agent) {
    agent = new https.Agent({ ca, keepAlive: true });
    agents.set(ca, agent);
  }
  return agent;
}

export async function sendPush(
  subscription: PushSubscriptionJson,
  payload: string | object,
  options: SendPushOptions,
): Promise<SendPushResult> {
  const origin = safeOrigin(subscription.endpoint);
  try {
    const result = await webpush.sendNotification(
      subscription,
      typeof payload === "string" ? payload : JSON.stringify(payload),
      {
        vapidDetails: options.vapid,
        TTL: options.ttl ?? DEFAULT_PUSH_TTL,
        contentEncoding: "aes128gcm",
        ...(options.urgency ? { urgency: options.urgency } : {}),
        ...(options.topic ? { topic: options.topic } : {}),
        ...(options.ca ? { agent: agentFor(options.ca) } : {}),
      },
    );
    log("push to %s accepted (%d)", origin, result.statusCode);
    return { ok: true };
  } catch (error) {
    if (error instanceof webpush.WebPushError) {
      // RFC 8030 §7.3 answers 404 for an expired subscription; deployed services answer 410: either way the caller drops it.
      const gone = error.statusCode === 404 || error.statusCode === 410;
      const message = error.body?.trim() || error.message;
      log("push to %s refused (%d%s): %s", origin, error.statusCode, gone ? ", gone" : "", message);
      return { ok: false, gone, status: error.statusCode, message };
    }
    const message = error instanceof Error ? error.message : String(error);
    log("push to %s failed: %s", origin, message);
    return { ok: false, gone: false, status: null, message };
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
