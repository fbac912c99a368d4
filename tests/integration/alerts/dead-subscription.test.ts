// A subscription the push service answers 404 or 410 is removed (RFC 8030 §7.3); a live one stays.
// The alert goes through the outbox and a real delivery worker to the fake push service.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { raiseAlert } from "@/db/queries/alerts";
import { savePushSubscription } from "@/db/queries/push";
import { alertEvents, memberships, pushSubscriptions, users } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { notifyAlert } from "@/lib/server/alerts/notify";
import { makeVapidKeys } from "@/lib/server/push/push";
import { newSubscriber, pushMessagesFor, pushRequest } from "../../helpers/push";
import { createProbes, type TestProbe } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
delete process.env.SMTP_PORT;

let userId: string;
let probe: TestProbe & { binId: string };
let worker: DeliveryWorker;
beforeAll(async () => {
  const [p] = await createProbes(1);
  const [u] = await db()
    .insert(users)
    .values({ email: `phones-${Date.now()}@example.org`, name: "Three phones", passwordHash: "x" })
    .returning();
  userId = u!.id;
  await db().insert(memberships).values({ userId, farmId: p!.farmId, role: "keeper" });
  const binId = ((await db().execute(`select bin_id as "binId" from zones where id = '${p!.zoneId}'`)).rows[0] as { binId: string }).binId;
  probe = { ...p!, binId };
  worker = createDeliveryWorker({ pollMs: 100 });
});
afterAll(async () => {
  await worker?.stop();
});

describe("dead push subscriptions", () => {
  it("a gone (410) and an unknown (404) subscription are removed; the live one is kept and reached", async () => {
    const live = await newSubscriber();
    const gone = await newSubscriber();
    const unknown = await newSubscriber();
    for (const s of [live, gone, unknown])
      await savePushSubscription(userId, { endpoint: s.json.endpoint, p256dh: s.json.keys.p256dh, auth: s.json.keys.auth });
    expect((await pushRequest("DELETE", `/subscription/${gone.id}`)).status).toBe(204);
    const unknownEndpoint = unknown.json.endpoint.replace(/[^/]+$/, "never-subscribed");
    await db().update(pushSubscriptions).set({ endpoint: unknownEndpoint }).where(eq(pushSubscriptions.endpoint, unknown.json.endpoint));

    const alert = await raiseAlert({
      farmId: probe.farmId,
      binId: probe.binId,
      zoneId: probe.zoneId,
      probeId: null,
      subject: `zone:${probe.zoneId}:heat`,
      kind: "heat",
      level: "act_now",
      value: 33,
      message: "Test bin: 33 °C",
      details: {},
    });
    expect(await notifyAlert(alert!, "raised")).toMatchObject({ queued: 3 });
    worker.kick();
    await worker.idle();

    const events = (await db().select().from(alertEvents).where(eq(alertEvents.alertId, alert!.id))).filter((e) => e.channel === "push");
    const byStatus = Object.fromEntries(events.map((e) => [String(e.detail.status), e]));
    expect(byStatus["201"]?.type).toBe("sent");
    expect(byStatus["410"]).toMatchObject({ type: "send_failed", detail: { removed: true } });
    expect(byStatus["404"]).toMatchObject({ type: "send_failed", detail: { removed: true } });
    const left = await db().select().from(pushSubscriptions).where(eq(pushSubscriptions.userId, userId));
    expect(left.map((s) => s.endpoint)).toEqual([live.json.endpoint]);
    expect(await pushMessagesFor(live.id)).toHaveLength(1);
  });
});
