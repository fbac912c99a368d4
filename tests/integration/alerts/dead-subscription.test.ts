// A subscription the push service answers 404 or 410 is removed (RFC 8030 §7.3); a live one stays.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { savePushSubscription } from "@/db/queries/push";
import { pushSubscriptions, users } from "@/db/schema";
import { pushToUsers } from "@/lib/alerts/deliver";
import { makeVapidKeys } from "@/lib/push";
import { newSubscriber, pushMessagesFor, pushRequest } from "../../helpers/push";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");

let userId: string;
beforeAll(async () => {
  const [u] = await db().insert(users).values({ email: `phones-${Date.now()}@example.org`, name: "Three phones", passwordHash: "x" }).returning();
  userId = u!.id;
});

describe("dead push subscriptions", () => {
  it("a gone (410) and an unknown (404) subscription are removed; the live one is kept and reached", async () => {
    const live = await newSubscriber();
    const gone = await newSubscriber();
    const unknown = await newSubscriber();
    for (const s of [live, gone, unknown]) await savePushSubscription(userId, { endpoint: s.json.endpoint, p256dh: s.json.keys.p256dh, auth: s.json.keys.auth });
    expect((await pushRequest("DELETE", `/subscription/${gone.id}`)).status).toBe(204);
    const unknownEndpoint = unknown.json.endpoint.replace(/[^/]+$/, "never-subscribed");
    await db().update(pushSubscriptions).set({ endpoint: unknownEndpoint }).where(eq(pushSubscriptions.endpoint, unknown.json.endpoint));

    const outcomes = await pushToUsers([userId], { title: "test", body: "hello" });
    const byStatus = Object.fromEntries(outcomes.map((o) => [String(o.status), o]));
    expect(byStatus["201"]?.ok).toBe(true);
    expect(byStatus["410"]?.removed).toBe(true);
    expect(byStatus["404"]?.removed).toBe(true);
    const left = await db().select().from(pushSubscriptions).where(eq(pushSubscriptions.userId, userId));
    expect(left.map((s) => s.endpoint)).toEqual([live.json.endpoint]);
    expect(await pushMessagesFor(live.id)).toHaveLength(1);
  });
});
