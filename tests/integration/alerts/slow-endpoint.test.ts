// Two farms on one ingest service: farm A's keeper subscribed on four phones at push endpoints that
// never answer (as many as the worker has slots), farm B's on one normal phone. Both farms' probes publish readings that raise a heat alert (real
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
import { makeVapidKeys } from "@/lib/server/push/push";
import { newSubscriber, pushAttemptsFor, pushMessagesFor, type TestSubscriber } from "../../helpers/push";
import { connectProbe, createProbes, tempPack, waitFor, type TestProbe } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
process.env.SMTP_PORT = String(inject("smtpPort"));

const TIMEOUT_MS = 2_000;
const ATTEMPTS = 3;
const SLOTS = 4;

type Farm = { probe: TestProbe; client: MqttClient; keeperId: string; email: string; subs: TestSubscriber[] };
let a: Farm;
let b: Farm;
let ingest: Ingest;
let runner: RuleRunner;
let worker: DeliveryWorker;
let simNow = 0;

async function farmWith(subs: TestSubscriber[]): Promise<Omit<Farm, "client">> {
  const [probe] = await createProbes(1);
  const email = `keeper-${probe!.code}@example.org`;
  const [k] = await db().insert(users).values({ email, name: "Keeper", passwordHash: "x" }).returning();
  await db().insert(memberships).values({ userId: k!.id, farmId: probe!.farmId, role: "keeper" });
  for (const sub of subs) await savePushSubscription(k!.id, { endpoint: sub.json.endpoint, p256dh: sub.json.keys.p256dh, auth: sub.json.keys.auth });
  return { probe: probe!, keeperId: k!.id, email, subs };
}

beforeAll(async () => {
  const slow = await farmWith(await Promise.all(Array.from({ length: SLOTS }, () => newSubscriber({ mode: "never-answers" }))));
  const quick = await farmWith([await newSubscriber()]);
  runner = createRuleRunner({ coalesceMs: 10, now: () => new Date(simNow), sweepMs: 3_600_000 });
  ingest = await startIngest({ port: 0 });
  await runner.listening(); // it hears of readings only through LISTEN, as in production
  a = { ...slow, client: await connectProbe(ingest.port, slow.probe) };
  b = { ...quick, client: await connectProbe(ingest.port, quick.probe) };
  // As on an ingest node: woken by NOTIFY when the rule runner queues a delivery; at most half its
  // slots (the default) go to one farm.
  worker = createDeliveryWorker({ listenUrl: process.env.DATABASE_URL, concurrency: SLOTS, timeoutMs: TIMEOUT_MS, maxAttempts: ATTEMPTS, backoffMs: 200 });
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
      await a.client.publishAsync(`wormward/${a.probe.code}/readings`, tempPack(a.probe.code, simNow / 1000, 33.5), { qos: 1 });
      const sentAt = Date.now();
      if (m >= 1) await b.client.publishAsync(`wormward/${b.probe.code}/readings`, tempPack(b.probe.code, simNow / 1000, 33.5), { qos: 1 });
      await runner.idle();
      if (await heatAlertOf(b)) bRaisedByPublishAt = sentAt;
    }
    expect(bRaisedByPublishAt).toBeGreaterThan(0);
    const alertA = (await heatAlertOf(a))!;
    expect(alertA.raisedAt.getTime()).toBeLessThan((await heatAlertOf(b))!.raisedAt.getTime());

    const [pushB] = await waitFor(
      "farm B's push",
      () => pushMessagesFor(b.subs[0]!.id),
      (m) => m.length > 0,
      20_000,
    );
    const latency = Date.parse(pushB!.receivedAt) - bRaisedByPublishAt;
    console.log(`farm B publish-to-push while farm A's push service hangs: ${latency} ms (push timeout ${TIMEOUT_MS} ms)`);
    expect(latency).toBeLessThan(TIMEOUT_MS);
    // Farm A's pushes were already out and hanging when farm B's arrived.
    const hanging = await Promise.all(a.subs.map((s) => pushAttemptsFor(s.id)));
    expect(hanging.reduce((x, y) => x + y, 0)).toBeGreaterThanOrEqual(1);
    expect((await listDeliveries({ alertId: alertA.id })).every((d) => d.state === "sending" || d.state === "pending")).toBe(true);

    // Farm A's deliveries end as timeouts after their retries, with nothing from the other end stored.
    const why = `no answer from the push service within ${TIMEOUT_MS / 1000} s`;
    const ended = await waitFor(
      "farm A's deliveries to end",
      () => listDeliveries({ alertId: alertA.id }),
      (r) => r.filter((d) => d.channel === "push").every((d) => d.state === "failed"),
      60_000,
    );
    expect(
      ended.filter((d) => d.channel === "push").map((d) => ({ state: d.state, attempts: d.attempts, status: d.lastStatus, reason: d.lastReason })),
    ).toEqual(Array(SLOTS).fill({ state: "failed", attempts: ATTEMPTS, status: null, reason: why }));
    expect(await Promise.all(a.subs.map((s) => pushAttemptsFor(s.id)))).toEqual(Array(SLOTS).fill(ATTEMPTS));
    const events = await db().select().from(alertEvents).where(eq(alertEvents.alertId, alertA.id));
    expect(events.filter((e) => e.channel === "push").map((e) => ({ type: e.type, detail: e.detail }))).toEqual(
      Array(SLOTS).fill({ type: "send_failed", detail: { reason: "raised", attempts: ATTEMPTS, status: null, why, removed: false } }),
    );
    // No push reached farm A's keeper, so the alert goes by e-mail; farm B's keeper, reached, gets none.
    await waitFor(
      "farm A's e-mail",
      () => mailTo(a.email),
      (m) => m.length === 1,
      10_000,
    );
    expect((await mailTo(a.email))[0]!.subject).toMatch(/Act now: Heat/);
    expect(await mailTo(b.email)).toHaveLength(0);
  });
});
