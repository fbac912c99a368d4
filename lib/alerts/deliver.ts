import fs from "node:fs";
import createDebug from "debug";
import { deletePushSubscriptionById, listPushSubscriptions } from "@/db/queries/push";
import { env } from "@/lib/env";
import { sendPush, type SendPushOptions } from "@/lib/push";

const log = createDebug("wormward:deliver");

export type PushOutcome = { userId: string; subscriptionId: string; ok: boolean; status: number | null; removed: boolean; message?: string };

let caCache: { file: string; pem: string } | null = null;
function pushOptions(): SendPushOptions | null {
  const e = env();
  if (!e.VAPID_PUBLIC_KEY || !e.VAPID_PRIVATE_KEY) return null;
  let ca: string | undefined;
  // Only the local fake push service needs a CA of its own; real push services use public ones.
  if (e.PUSH_CA_FILE && fs.existsSync(e.PUSH_CA_FILE)) {
    if (caCache?.file !== e.PUSH_CA_FILE) caCache = { file: e.PUSH_CA_FILE, pem: fs.readFileSync(e.PUSH_CA_FILE, "utf8") };
    ca = caCache.pem;
  }
  return { vapid: { publicKey: e.VAPID_PUBLIC_KEY, privateKey: e.VAPID_PRIVATE_KEY, subject: e.VAPID_SUBJECT }, ca, urgency: "high" };
}

export const pushConfigured = () => pushOptions() !== null;

// Sends one payload to every push subscription of these people; a subscription the push service
// answers 404 or 410 is gone for good (RFC 8030 §7.3) and is removed.
export async function pushToUsers(userIds: string[], payload: object): Promise<PushOutcome[]> {
  const opts = pushOptions();
  if (!opts) return [];
  const subs = await listPushSubscriptions(userIds);
  return Promise.all(
    subs.map(async (s): Promise<PushOutcome> => {
      const r = await sendPush({ endpoint: s.endpoint, keys: { p256dh: s.p256dh, auth: s.auth } }, payload, opts);
      if (r.ok) return { userId: s.userId, subscriptionId: s.id, ok: true, status: 201, removed: false };
      if (r.gone) await deletePushSubscriptionById(s.id);
      log("push to %s failed: %s %s%s", new URL(s.endpoint).origin, r.status, r.message, r.gone ? " (removed)" : "");
      return { userId: s.userId, subscriptionId: s.id, ok: false, status: r.status, removed: r.gone, message: r.message };
    }),
  );
}
