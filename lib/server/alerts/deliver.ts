// Sending one push: the options every send shares (VAPID keys, the allow-list, the timeout, the
// fake's CA), and the test push a person sends to their own phones from the settings page.
import { createHash } from "node:crypto";
import fs from "node:fs";
import createDebug from "debug";
import { deletePushSubscriptionById, listPushSubscriptions } from "@/db/queries/push";
import { env } from "@/lib/server/env";
import { sendPush, type SendPushOptions, type SendPushResult } from "@/lib/server/push/push";
import { configuredAllowList } from "@/lib/server/push/push-policy";

const log = createDebug("wormward:deliver");

export type PushOutcome = { subscriptionId: string; ok: boolean; status: number | null; removed: boolean; reason?: string };

let caCache: { file: string; pem: string } | null = null;
export function pushOptions(): SendPushOptions | null {
  const e = env();
  if (!e.VAPID_PUBLIC_KEY || !e.VAPID_PRIVATE_KEY) return null;
  let ca: string | undefined;
  // Only the local fake push service needs a CA of its own; real push services use public ones.
  if (e.PUSH_CA_FILE && fs.existsSync(e.PUSH_CA_FILE)) {
    if (caCache?.file !== e.PUSH_CA_FILE) caCache = { file: e.PUSH_CA_FILE, pem: fs.readFileSync(e.PUSH_CA_FILE, "utf8") };
    ca = caCache.pem;
  }
  return {
    vapid: { publicKey: e.VAPID_PUBLIC_KEY, privateKey: e.VAPID_PRIVATE_KEY, subject: e.VAPID_SUBJECT },
    allow: configuredAllowList(),
    ca,
    urgency: "high",
    timeoutMs: e.PUSH_TIMEOUT_MS,
  };
}

export const pushConfigured = () => pushOptions() !== null;

// RFC 8030 §5.4: a Topic lets the push service replace a message it still holds with a newer one of
// the same topic, so a delivery sent again after a crash mid-send reaches the phone once.
export const topicOf = (dedupeKey: string) => createHash("sha256").update(dedupeKey).digest("base64url").slice(0, 32);

export async function sendToSubscription(
  s: { endpoint: string; p256dh: string; auth: string },
  payload: object,
  opts: SendPushOptions,
): Promise<SendPushResult> {
  return sendPush({ endpoint: s.endpoint, keys: { p256dh: s.p256dh, auth: s.auth } }, payload, opts);
}

// The settings page's test: straight to each of the caller's phones at once (each send bounded by
// the push timeout); a subscription the push service answers 404 or 410 is removed (RFC 8030 §7.3).
export async function sendTestPush(userId: string): Promise<PushOutcome[]> {
  const opts = pushOptions();
  if (!opts) return [];
  const payload = { kind: "test", title: "Wormward test", body: "Alerts will arrive on this phone like this one.", url: "/" };
  const subs = await listPushSubscriptions([userId]);
  return Promise.all(
    subs.map(async (s): Promise<PushOutcome> => {
      const r = await sendToSubscription(s, payload, opts);
      if (r.ok) return { subscriptionId: s.id, ok: true, status: r.status, removed: false };
      if (r.gone) await deletePushSubscriptionById(s.id);
      log("test push to subscription %s failed: %s %s", s.id, r.status, r.reason);
      return { subscriptionId: s.id, ok: false, status: r.status, removed: r.gone, reason: r.reason };
    }),
  );
}
