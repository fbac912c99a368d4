// Quiet hours hold back heads-ups only: an act-now alert reaches the same person at once. Pushes
// go through the outbox and a real delivery worker to the fake push service.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { raiseAlert } from "@/db/queries/alerts";
import { savePushSubscription } from "@/db/queries/push";
import { alertEvents, memberships, users } from "@/db/schema";
import { claimAlertAs } from "@/lib/server/alerts/crew";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { deliverHeldAlerts, notifyAlert } from "@/lib/server/alerts/notify";
import { makeVapidKeys } from "@/lib/server/push/push";
import { newSubscriber, pushMessagesFor, type TestSubscriber } from "../../helpers/push";
import { createProbes, type TestProbe } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
delete process.env.SMTP_PORT;

let probe: TestProbe;
let sleeper: TestSubscriber;
let binId: string;
let worker: DeliveryWorker;
const night = new Date("2026-12-01T02:00:00Z");

beforeAll(async () => {
  probe = (await createProbes(1))[0]!;
  const d = db();
  const [u] = await d
    .insert(users)
    .values({ email: `sleeper-${probe.code}@example.org`, name: "Sleeper", passwordHash: "x", quietFrom: "22:00", quietTo: "06:30", timezone: "UTC" })
    .returning();
  await d.insert(memberships).values({ userId: u!.id, farmId: probe.farmId, role: "keeper" });
  sleeper = await newSubscriber();
  await savePushSubscription(u!.id, { endpoint: sleeper.json.endpoint, p256dh: sleeper.json.keys.p256dh, auth: sleeper.json.keys.auth });
  binId = ((await d.execute(`select bin_id as "binId" from zones where id = '${probe.zoneId}'`)).rows[0] as { binId: string }).binId;
  worker = createDeliveryWorker({ pollMs: 100 });
});
afterAll(async () => {
  await worker?.stop();
});

const base = () => ({ farmId: probe.farmId, binId, zoneId: probe.zoneId, probeId: null, value: 26, details: {} });

describe("quiet hours", () => {
  it("a heads-up at 02:00 is held back for a keeper whose quiet hours are 22:00–06:30", async () => {
    const a = await raiseAlert(
      { ...base(), subject: `zone:${probe.zoneId}:soggy`, kind: "soggy", level: "heads_up", message: "Test bin: 88 % moisture" },
      night,
    );
    const r = await notifyAlert(a!, "raised", night);
    expect(r).toMatchObject({ queued: 0, held: 1 });
    await worker.idle();
    expect(await pushMessagesFor(sleeper.id)).toHaveLength(0);
    const events = await db().select().from(alertEvents).where(eq(alertEvents.alertId, a!.id));
    expect(events.map((e) => e.type).sort()).toEqual(["held", "raised"]);
  });

  it("an act-now alert at 02:00 reaches the same keeper", async () => {
    const a = await raiseAlert({ ...base(), subject: `zone:${probe.zoneId}:heat`, kind: "heat", level: "act_now", message: "Test bin: 34 °C" }, night);
    const r = await notifyAlert(a!, "raised", night);
    expect(r).toMatchObject({ queued: 1, held: 0 });
    await worker.idle();
    expect(await pushMessagesFor(sleeper.id)).toHaveLength(1);
    const sent = (await db().select().from(alertEvents).where(eq(alertEvents.alertId, a!.id))).filter((e) => e.type === "sent");
    expect(sent.map((e) => e.channel)).toEqual(["push"]);
  });
});

describe("when quiet hours end", () => {
  it("a held heads-up still waiting for a person is delivered once; a claimed one is not", async () => {
    const waiting = await raiseAlert(
      { ...base(), subject: `zone:${probe.zoneId}:drying`, kind: "drying", level: "heads_up", message: "Test bin: 69 % and drying" },
      night,
    );
    const taken = await raiseAlert({ ...base(), subject: `zone:${probe.zoneId}:chill`, kind: "chill", level: "heads_up", message: "Test bin: 14 °C" }, night);
    await notifyAlert(waiting!, "raised", night);
    await notifyAlert(taken!, "raised", night);
    const userId = (await db().select({ userId: alertEvents.userId }).from(alertEvents).where(eq(alertEvents.alertId, taken!.id))).find(
      (e) => e.userId,
    )!.userId!;
    await claimAlertAs({ userId }, taken!.id);
    await worker.idle();
    const before = (await pushMessagesFor(sleeper.id)).length;

    // Still night: nothing goes out.
    expect(await deliverHeldAlerts(new Date("2026-12-01T05:00:00Z"))).toBe(0);
    // 07:00, after quiet hours: the waiting heads-up (and the soggy one from the first test) go out,
    // once, even when two sweeps run at the same moment.
    const morning = new Date("2026-12-01T07:00:00Z");
    const [a, b] = await Promise.all([deliverHeldAlerts(morning), deliverHeldAlerts(morning)]);
    expect(a + b).toBe(2);
    await worker.idle();
    const after = await pushMessagesFor(sleeper.id);
    expect(after.length - before).toBe(2);
    expect(await deliverHeldAlerts(morning)).toBe(0);
  });
});
