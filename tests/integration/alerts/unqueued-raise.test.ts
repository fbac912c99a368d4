// A process killed between committing an alert and queueing its deliveries (kill -9, the database
// lost in between) left the crew never told: the next evaluation finds the alert open and raises
// nothing. The minute sweep (remindAndRelease) now queues such a raise or escalation once, after a
// grace for the raising process's own retries, and two nodes sweeping at once queue it once.
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { escalateAlert, getAlertRow } from "@/db/queries/alerts";
import { listDeliveries } from "@/db/queries/deliveries";
import { savePushSubscription } from "@/db/queries/push";
import { alertEvents, memberships, users } from "@/db/schema";
import { remindAndRelease } from "@/lib/server/alerts/evaluate-zone";
import { notifyAlert } from "@/lib/server/alerts/notify";
import { makeVapidKeys } from "@/lib/server/push/push";
import { newSubscriber } from "../../helpers/push";
import { raiseOn } from "./helpers";
import { createProbes, type TestProbe } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
delete process.env.SMTP_PORT;

const MIN = 60_000;
const REMIND_AFTER = 15 * MIN;

let probe: TestProbe;
let sleeperId: string;

beforeAll(async () => {
  probe = (await createProbes(1))[0]!;
  const d = db();
  // One keeper awake with a phone, one asleep (quiet hours all day) with a phone.
  const [awake] = await d
    .insert(users)
    .values({ email: `awake-${probe.code}@example.org`, name: "Awake", passwordHash: "x" })
    .returning();
  const [sleeper] = await d
    .insert(users)
    .values({ email: `asleep-${probe.code}@example.org`, name: "Asleep", passwordHash: "x", quietFrom: "00:00", quietTo: "23:59", timezone: "UTC" })
    .returning();
  sleeperId = sleeper!.id;
  for (const u of [awake!, sleeper!]) {
    await d.insert(memberships).values({ userId: u.id, farmId: probe.farmId, role: "keeper" });
    const phone = await newSubscriber();
    await savePushSubscription(u.id, { endpoint: phone.json.endpoint, p256dh: phone.json.keys.p256dh, auth: phone.json.keys.auth });
  }
});

// Raised straight into the table, as the rule runner does, and then "killed": nothing queued.
const raiseUnqueued = (kind: "heat" | "soggy" | "drying" | "chill", level: "heads_up" | "act_now", at: Date) => raiseOn(probe, kind, level, 30, "Test bin", at);
const deliveriesOf = async (alertId: string) => (await listDeliveries({ alertId })).map((d) => `${d.reason}:${d.channel}:${d.userId}`).sort();
const heldOf = async (alertId: string) =>
  (
    await db()
      .select()
      .from(alertEvents)
      .where(and(eq(alertEvents.alertId, alertId), eq(alertEvents.type, "held")))
  ).map((e) => e.userId);

describe("an alert whose deliveries were never queued", () => {
  it("is queued by the sweep once the grace has passed, and only once", async () => {
    const t0 = new Date(Date.now() - 5 * MIN);
    const a = await raiseUnqueued("heat", "act_now", t0);
    expect(await deliveriesOf(a.id)).toEqual([]);

    // Inside the grace: the raising process may still be retrying.
    await remindAndRelease(REMIND_AFTER, new Date(t0.getTime() + 30_000));
    expect(await deliveriesOf(a.id)).toEqual([]);

    await remindAndRelease(REMIND_AFTER, new Date(t0.getTime() + 2 * MIN));
    // Act now reaches both keepers, quiet hours or not.
    const queued = await deliveriesOf(a.id);
    expect(queued).toHaveLength(2);
    expect(queued.every((k) => k.startsWith("raised:push:"))).toBe(true);
    expect((await getAlertRow(a.id))!.lastSentAt?.getTime()).toBe(t0.getTime() + 2 * MIN);

    await remindAndRelease(REMIND_AFTER, new Date(t0.getTime() + 3 * MIN));
    expect(await deliveriesOf(a.id)).toEqual(queued);
  });

  it("two nodes sweeping at once queue it once: one held event for the sleeper, one push for the other", async () => {
    const t0 = new Date(Date.now() - 5 * MIN);
    const a = await raiseUnqueued("soggy", "heads_up", t0);
    const at = new Date(t0.getTime() + 2 * MIN);
    await Promise.all([remindAndRelease(REMIND_AFTER, at), remindAndRelease(REMIND_AFTER, at)]);
    expect(await deliveriesOf(a.id)).toHaveLength(1);
    expect(await heldOf(a.id)).toEqual([sleeperId]);
  });

  it("an escalation never queued is queued as an escalation", async () => {
    const t0 = new Date(Date.now() - 10 * MIN);
    const a = await raiseUnqueued("drying", "heads_up", t0);
    // The raise was queued as usual; then the escalation committed and the process died.
    await notifyAlert(a, "raised", t0);
    const raisedDeliveries = await deliveriesOf(a.id);
    expect(raisedDeliveries).toHaveLength(1);
    const t1 = new Date(t0.getTime() + MIN);
    await escalateAlert(a.subject, { value: 12, message: "Test bin: drying fast", details: {} }, t1);

    await remindAndRelease(REMIND_AFTER, new Date(t1.getTime() + 2 * MIN));
    const after = await deliveriesOf(a.id);
    expect(after.filter((k) => k.startsWith("escalated:push:"))).toHaveLength(2);
    expect(after.filter((k) => k.startsWith("raised:"))).toEqual(raisedDeliveries);
  });

  it("a raise more than a day old is left alone", async () => {
    // A heads-up, so no reminder is due either.
    const old = await raiseUnqueued("chill", "heads_up", new Date(Date.now() - 30 * 3600_000));
    await remindAndRelease(REMIND_AFTER, new Date(Date.now() - 10 * MIN));
    expect(await deliveriesOf(old.id)).toEqual([]);
  });
});
