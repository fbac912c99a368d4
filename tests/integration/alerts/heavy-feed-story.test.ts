// The story, end to end against the real services: a heavy feeding in a fresh zone, the probe's
// temperature climbing 2 °C/h over MQTT, a heat heads-up, act now when it leaves the band, the
// push received by the fake push service and decrypted with the subscriber's private key, a
// claim, and the alert settling when the zone cools. The readings carry times of the last hours,
// and the rule runner's clock follows them, so hours of a bed's life pass in seconds.
import { createRequire } from "node:module";
import { eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { claimAlertAs } from "@/lib/server/alerts/crew";
import { insertFeeding } from "@/db/queries/feedings";
import { savePushSubscription } from "@/db/queries/push";
import { alertEvents, alerts, memberships, rules, users } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { createRuleRunner, type RuleRunner } from "@/ingest/rule-runner";
import { startIngest, type Ingest } from "@/ingest/service";
import { probeBaseName } from "@/lib/domain/metrics";
import { makeVapidKeys } from "@/lib/server/push/push";
import { newSubscriber, pushMessagesFor, type TestSubscriber } from "../../helpers/push";
import { connectProbe, createProbes, type TestProbe } from "../ingest/helpers";
import { cautionFor } from "@/lib/domain/alert-words";

type Ece = { decrypt(body: Buffer, opts: { version: "aes128gcm"; privateKey: unknown; authSecret: Buffer }): Buffer };
const ece = createRequire(import.meta.url)("http_ece") as Ece;

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
process.env.SMTP_PORT = String(inject("smtpPort"));

let probe: TestProbe;
let ingest: Ingest;
let runner: RuleRunner;
let worker: DeliveryWorker;
let client: MqttClient;
let keeper: TestSubscriber;
let keeperId: string;
let simNow = 0;

beforeAll(async () => {
  probe = (await createProbes(1))[0]!;
  const d = db();
  const [k] = await d
    .insert(users)
    .values({ email: `keeper-${probe!.code}@example.org`, name: "Story Keeper", passwordHash: "x" })
    .returning();
  keeperId = k!.id;
  await d.insert(memberships).values({ userId: keeperId, farmId: probe!.farmId, role: "keeper" });
  keeper = await newSubscriber();
  await savePushSubscription(keeperId, { endpoint: keeper.json.endpoint, p256dh: keeper.json.keys.p256dh, auth: keeper.json.keys.auth });
  // The owner's override: act now as soon as the bed leaves the comfortable band (25 °C for E. fetida).
  const [{ binId }] = (await d.execute(`select bin_id as "binId" from zones where id = '${probe!.zoneId}'`)).rows as [{ binId: string }];
  await d.insert(rules).values({ farmId: probe!.farmId, binId, kind: "heat", thresholds: { actNowAtC: 25 } });
  runner = createRuleRunner({ coalesceMs: 10, now: () => new Date(simNow) });
  ingest = await startIngest({ port: 0 });
  await runner.listening(); // it hears of readings only through LISTEN, as in production
  client = await connectProbe(ingest.port, probe!);
  // The sender, as on an ingest node: woken by NOTIFY when the rule runner queues a delivery.
  worker = createDeliveryWorker({ listenUrl: process.env.DATABASE_URL });
});

afterAll(async () => {
  await client?.endAsync();
  await ingest?.close();
  await runner?.stop();
  await worker?.stop();
});

async function zoneAlerts(kind = "heat") {
  return (await db().select().from(alerts).where(eq(alerts.zoneId, probe.zoneId))).filter((a) => a.kind === kind);
}

describe("a heavy feed heats the fresh zone", () => {
  it("raises a heads-up, then act now, pushes it to the keeper, is claimed, and settles when the zone cools", async () => {
    const start = Date.now() - 6 * 3600_000;
    const binId = ((await db().execute(`select bin_id as "binId" from zones where id = '${probe.zoneId}'`)).rows[0] as { binId: string }).binId;
    await insertFeeding({
      farmId: probe.farmId,
      binId,
      zoneId: probe.zoneId,
      at: new Date(start),
      byUserId: keeperId,
      notes: "heavy feed",
      mixMoisturePct: 82,
      mixCn: 18,
      totalKg: 12,
      items: [{ ingredientId: null, name: "vegetable scraps", massKg: 12, moisturePct: 87, carbonPct: 51.3, nitrogenPct: 2.7 }],
    });

    const seen: { minute: number; type: string; level: string }[] = [];
    let escalatedAtReal = 0;
    const publishMinute = async (minute: number, celsius: number) => {
      simNow = start + minute * 60_000;
      const pack = JSON.stringify([{ bn: probeBaseName(probe.code), bt: simNow / 1000, n: "temp", u: "Cel", v: +celsius.toFixed(2) }]);
      const sentAt = Date.now();
      await client.publishAsync(`wormward/${probe.code}/readings`, pack, { qos: 1 });
      await runner.idle();
      for (const a of await zoneAlerts()) {
        const last = seen.at(-1);
        if (!last || last.level !== a.level || last.type !== a.state) {
          seen.push({ minute, type: a.state, level: a.level });
          if (a.level === "act_now" && !escalatedAtReal) escalatedAtReal = sentAt;
        }
      }
    };

    // 20 °C steady for 30 min, then a climb of 2 °C/h for 2 h 30 min (to 25 °C and beyond).
    for (let m = 0; m < 30; m++) await publishMinute(m, 20);
    for (let m = 30; m <= 180; m++) await publishMinute(m, 20 + (2 * (m - 30)) / 60);

    const open = (await zoneAlerts()).filter((a) => a.state !== "settled");
    expect(open).toHaveLength(1);
    const alert = open[0]!;
    // The mix (C:N 18, wet) and the warming also raise an ammonia-risk heads-up, as they should.
    expect((await zoneAlerts("ammonia")).map((a) => a.level)).toEqual(["heads_up"]);
    const headsUp = seen.find((s) => s.level === "heads_up");
    const actNow = seen.find((s) => s.level === "act_now");
    // Heads-up from the rate of rise while still inside the band (below 25 °C, i.e. before minute 180),
    // act now only after the bed passed 25 °C (minute 180 of the climb → 25 °C at minute 180).
    expect(headsUp, JSON.stringify(seen)).toBeDefined();
    expect(headsUp!.minute).toBeLessThan(180);
    expect(actNow).toBeUndefined(); // 25.0 °C is reached only at the last minute: not yet "held 10 min"

    // Ten more minutes above 25 °C: act now.
    for (let m = 181; m <= 195; m++) await publishMinute(m, 20 + (2 * (m - 30)) / 60);
    const afterClimb = (await zoneAlerts()).find((a) => a.id === alert.id)!;
    expect(afterClimb.level).toBe("act_now");
    expect(seen.find((s) => s.level === "act_now")!.minute).toBeGreaterThanOrEqual(190);

    // The fake push service received both notifications; decrypt them as the phone would (RFC 8291).
    await worker.idle();
    const messages = await pushMessagesFor(keeper.id);
    expect(messages.length).toBeGreaterThanOrEqual(2);
    const payloads = messages.map(
      (m) =>
        JSON.parse(
          ece.decrypt(Buffer.from(m.body, "base64url"), { version: "aes128gcm", privateKey: keeper.ecdh, authSecret: keeper.authSecret }).toString("utf8"),
        ) as { level: string; bin: string; zone: string; body: string; alertId: string; value: number },
    );
    const urgent = payloads.find((p) => p.level === "act_now" && p.alertId === alert.id)!;
    expect(urgent.alertId).toBe(alert.id);
    expect(urgent.bin).toBe("Test bin");
    expect(urgent.zone).toBe("working");
    expect(urgent.body).toMatch(/°C/);
    // A heat alert's push carries the closed-room caution after its message.
    expect(urgent.body.endsWith(` ${cautionFor("heat")}`)).toBe(true);
    expect(urgent.value).toBeGreaterThan(25);
    const actNowMessage = messages[payloads.indexOf(urgent)]!;
    console.log(`publish-to-push latency (act now): ${Date.parse(actNowMessage.receivedAt) - escalatedAtReal} ms`);
    console.log(`alert timeline (minutes after the feeding; climb starts at 30): ${seen.map((s) => `${s.minute} ${s.level}/${s.type}`).join(", ")}`);

    // One keeper claims it.
    const claimed = await claimAlertAs({ userId: keeperId }, alert.id);
    expect(claimed.state).toBe("claimed");
    await expect(claimAlertAs({ userId: keeperId }, alert.id)).rejects.toThrow(/Already claimed/);

    // The zone cools to 22 °C; after 15 min below 24.5 °C the alert settles.
    let m = 196;
    for (let c = 25.5; c > 22; c -= 0.1) await publishMinute(m++, c);
    for (let i = 0; i < 20; i++) await publishMinute(m++, 22);
    const settled = (await zoneAlerts()).find((a) => a.id === alert.id)!;
    expect(settled.state).toBe("settled");
    const events = await db().select().from(alertEvents).where(eq(alertEvents.alertId, alert.id));
    expect(events.map((e) => e.type)).toEqual(expect.arrayContaining(["raised", "escalated", "sent", "claimed", "settled"]));
  });
});
