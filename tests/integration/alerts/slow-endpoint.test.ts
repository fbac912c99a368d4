// Two farms on one ingest service: farm A's keeper subscribed at a push endpoint that never answers,
// farm B's at a normal one. Both farms' probes publish readings that raise a heat alert (real
// broker, real rule runner, real delivery worker). Farm B's push arrives within the push timeout
// while farm A's is still hanging; farm A's ends as a timeout after its retries, in our words,
// and its keeper gets the alert by e-mail instead.
import { eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { listDeliveries } from "@/db/queries/deliveries";
import { savePushSubscription } from "@/db/queries/push";
import { alertEvents, alerts, memberships, users } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { createRuleRunner, type RuleRunner } from "@/ingest/rule-runner";
import { startIngest, type Ingest } from "@/ingest/service";
import { makeVapidKeys } from "@/lib/push";
import { newSubscriber, pushAttemptsFor, pushMessagesFor, type TestSubscriber } from "../../helpers/push";
import { connectProbe, createProbes, tempPack, waitFor, type TestProbe } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
process.env.SMTP_PORT = String(inject("smtpPort"));

const TIMEOUT_MS = 3_000;
const ATTEMPTS = 3;

type Farm = { probe: TestProbe; client: MqttClient; keeperId: string; email: string; sub: TestSubscriber };
let a: Farm;
let b: Farm;
let ingest: Ingest;
let runner: RuleRunner;
let worker: DeliveryWorker;
let simNow = 0;

async function farmWith(sub: TestSubscriber): Promise<Omit<Farm, "client">> {
  const [probe] = await createProbes(1);
  const email = `keeper-${probe!.code}@example.org`;
  const [k] = await db().insert(users).values({ email, name: "Keeper", passwordHash: "x" }).returning();
  await db().insert(memberships).values({ userId: k!.id, farmId: probe!.farmId, role: "keeper" });
  await savePushSubscription(k!.id, { endpoint: sub.json.endpoint, p256dh: sub.json.keys.p256dh, auth: sub.json.keys.auth });
  return { probe: probe!, keeperId: k!.id, email, sub };
}

beforeAll(async () => {
  const slow = await farmWith(await newSubscriber({ mode: "never-answers" }));
  const quick = await farmWith(await newSubscriber());
  runner = createRuleRunner({ coalesceMs: 10, now: () => new Date(simNow), sweepMs: 3_600_000 });
  ingest = await startIngest({ port: 0, onCommitted: (zoneIds) => runner.onCommitted(zoneIds) });
  a = { ...slow, client: await connectProbe(ingest.port, slow.probe) };
  b = { ...quick, client: await connectProbe(ingest.port, quick.probe) };
  // As on an ingest node: woken by NOTIFY when the rule runner queues a delivery.
  worker = createDeliveryWorker({ listenUrl: process.env.DATABASE_URL, timeoutMs: TIMEOUT_MS, maxAttempts: ATTEMPTS, backoffMs: 200 });
});

afterAll(async () => {
  await a?.client.endAsync();
  await b?.client.endAsync();
  await ingest?.close();
  await runner?.stop();
  await worker?.stop();
});

const heatAlertOf = async (f: Farm) => (await db().select().from(alerts).where(eq(alerts.zoneId, f.probe.zoneId))).find((x) => x.kind === "heat");

async function mailTo(address: string) {
  const r = await fetch(`${inject("mailboxUrl")}/messages`);
  const body = (await r.json()) as { to: string[]; subject: string }[] | { messages: { to: string[]; subject: string }[] };
  return (Array.isArray(body) ? body : body.messages).filter((m) => m.to.includes(address));
}

describe("one farm's slow push endpoint", () => {
  it("a push endpoint that never answers does not delay another farm's heat alert", async () => {
    const start = Date.now() - 3600_000;
    let bRaisedByPublishAt = 0;
    // Farm A's bed is a minute ahead of farm B's, so A's alert (and its hanging push) comes first.
    for (let m = 0; m <= 16 && !bRaisedByPublishAt; m++) {
      simNow = start + m * 60_000;
      await a.client.publishAsync(`wormward/${a.probe.code}/up`, tempPack(a.probe.code, simNow / 1000, 33.5), { qos: 1 });
      const sentAt = Date.now();
      if (m >= 1) await b.client.publishAsync(`wormward/${b.probe.code}/up`, tempPack(b.probe.code, simNow / 1000, 33.5), { qos: 1 });
      await runner.idle();
      if (await heatAlertOf(b)) bRaisedByPublishAt = sentAt;
    }
    expect(bRaisedByPublishAt).toBeGreaterThan(0);
    const alertA = (await heatAlertOf(a))!;
    expect(alertA.raisedAt.getTime()).toBeLessThan((await heatAlertOf(b))!.raisedAt.getTime());

    const [pushB] = await waitFor("farm B's push", () => pushMessagesFor(b.sub.id), (m) => m.length > 0, 20_000);
    const latency = Date.parse(pushB!.receivedAt) - bRaisedByPublishAt;
    console.log(`farm B publish-to-push while farm A's push service hangs: ${latency} ms (push timeout ${TIMEOUT_MS} ms)`);
    expect(latency).toBeLessThan(TIMEOUT_MS);
    // Farm A's push was already out and hanging when farm B's arrived.
    expect(await pushAttemptsFor(a.sub.id)).toBeGreaterThanOrEqual(1);
    const [stillOpen] = await listDeliveries({ alertId: alertA.id });
    expect(stillOpen!.state === "sending" || stillOpen!.state === "pending").toBe(true);

    // Farm A's delivery ends as a timeout after its retries, with nothing from the other end stored.
    const [ended] = await waitFor("farm A's delivery to end", () => listDeliveries({ alertId: alertA.id }), (r) => r.some((d) => d.channel === "push" && d.state === "failed"), ATTEMPTS * (TIMEOUT_MS + 2_000) + 10_000);
    expect(ended).toMatchObject({ channel: "push", state: "failed", attempts: ATTEMPTS, lastStatus: null, lastReason: `no answer from the push service within ${TIMEOUT_MS / 1000} s` });
    expect(await pushAttemptsFor(a.sub.id)).toBe(ATTEMPTS);
    const events = await db().select().from(alertEvents).where(eq(alertEvents.alertId, alertA.id));
    expect(events.filter((e) => e.channel === "push").map((e) => ({ type: e.type, detail: e.detail }))).toEqual([
      { type: "send_failed", detail: { reason: "raised", attempts: ATTEMPTS, status: null, why: `no answer from the push service within ${TIMEOUT_MS / 1000} s`, removed: false } },
    ]);
    // No push reached farm A's keeper, so the alert goes by e-mail; farm B's keeper, reached, gets none.
    await waitFor("farm A's e-mail", () => mailTo(a.email), (m) => m.length === 1, 10_000);
    expect((await mailTo(a.email))[0]!.subject).toMatch(/Act now: Heat/);
    expect(await mailTo(b.email)).toHaveLength(0);
  });
});
