// What a push service answers stays with it: a delivery that fails keeps the status and a reason in
// our own words, in the outbox row and in the alert's events, never the answer's body.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { listDeliveries } from "@/db/queries/deliveries";
import { alertEvents } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { notifyAlert } from "@/lib/server/alerts/notify";
import { makeVapidKeys } from "@/lib/server/push/push";
import { newSubscriber, pushAttemptsFor } from "../../helpers/push";
import { addKeeper, raiseActNow } from "./helpers";
import { createProbes } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
delete process.env.SMTP_PORT;

let worker: DeliveryWorker;
beforeAll(() => {
  worker = createDeliveryWorker({ pollMs: 50, backoffMs: 50, maxAttempts: 2 });
});
afterAll(async () => {
  await worker?.stop();
});

describe("the push test does not return what the push service said", () => {
  it("nor is it stored with the alert: a 400 and a 503 with bodies leave the status and our words", async () => {
    const secret = "internal-relay=10.9.8.7 session=abcd1234 <pre>Traceback</pre>";
    const [probe] = await createProbes(1);
    const refusing = await newSubscriber({ mode: "answers", status: 400, body: secret });
    const failing = await newSubscriber({ mode: "answers", status: 503, body: secret });
    await addKeeper(probe!, `answers-${probe!.code}@example.org`, "Two phones", [refusing, failing]);
    const alert = await raiseActNow(probe!, "heat", 34, "°C");

    await notifyAlert(alert, "raised");
    worker.kick();
    await worker.idle({ includeRetries: true });

    // A 400 fails for good at once; a 503 is tried again, then fails.
    expect(await pushAttemptsFor(refusing.id)).toBe(1);
    expect(await pushAttemptsFor(failing.id)).toBe(2);
    const rows = await listDeliveries({ alertId: alert.id });
    expect(rows.map((d) => ({ state: d.state, status: d.lastStatus, reason: d.lastReason })).sort((a, b) => a.status! - b.status!)).toEqual([
      { state: "failed", status: 400, reason: "the push service refused the message" },
      { state: "failed", status: 503, reason: "the push service had a problem on its side" },
    ]);
    const events = (await db().select().from(alertEvents).where(eq(alertEvents.alertId, alert.id))).filter((e) => e.type === "send_failed");
    expect(events.map((e) => e.detail.status).sort()).toEqual([400, 503]);
    const stored = JSON.stringify({ rows, events });
    for (const piece of ["internal-relay", "10.9.8.7", "abcd1234", "Traceback"]) expect(stored).not.toContain(piece);
  });
});
