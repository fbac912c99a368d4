// With no push subscription, an alert reaches the keeper through the fake mailbox; an unclaimed
// act-now alert is sent again after 15 minutes and e-mailed to the owners.
import { eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { alertEvents, alerts, memberships, users } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { createRuleRunner, type RuleRunner } from "@/ingest/rule-runner";
import { startIngest, type Ingest } from "@/ingest/service";
import { probeBaseName } from "@/lib/domain/metrics";
import { cautionFor } from "@/lib/domain/alert-words";
import { makeVapidKeys } from "@/lib/server/push/push";
import { connectProbe, createProbes, type TestProbe } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
process.env.SMTP_PORT = String(inject("smtpPort"));

type Mail = { to: string[]; subject: string; text: string };
async function mailTo(address: string): Promise<Mail[]> {
  const r = await fetch(`${inject("mailboxUrl")}/messages`);
  const body = (await r.json()) as Mail[] | { messages: Mail[] };
  return (Array.isArray(body) ? body : body.messages).filter((m) => m.to.includes(address));
}

let probe: TestProbe;
let ingest: Ingest;
let runner: RuleRunner;
let worker: DeliveryWorker;
let client: MqttClient;
let simNow = 0;
const keeperEmail = `no-phone-${Date.now()}@example.org`;
const ownerEmail = `owner-${Date.now()}@example.org`;

beforeAll(async () => {
  probe = (await createProbes(1))[0]!;
  const d = db();
  for (const [email, role] of [
    [keeperEmail, "keeper"],
    [ownerEmail, "owner"],
  ] as const) {
    const [u] = await d.insert(users).values({ email, name: role, passwordHash: "x" }).returning();
    await d.insert(memberships).values({ userId: u!.id, farmId: probe.farmId, role });
  }
  runner = createRuleRunner({ coalesceMs: 10, now: () => new Date(simNow), sweepMs: 3_600_000 });
  ingest = await startIngest({ port: 0 });
  await runner.listening(); // it hears of readings only through LISTEN, as in production
  client = await connectProbe(ingest.port, probe);
  worker = createDeliveryWorker({ pollMs: 100, listenUrl: process.env.DATABASE_URL });
});

afterAll(async () => {
  await client?.endAsync();
  await ingest?.close();
  await runner?.stop();
  await worker?.stop();
});

describe("e-mail when push is not possible", () => {
  it("an act-now heat alert arrives in the mailbox, and the unclaimed reminder goes to the owners too", async () => {
    const start = Date.now() - 3600_000;
    for (let m = 0; m <= 14; m++) {
      simNow = start + m * 60_000;
      await client.publishAsync(
        `wormward/${probe.code}/readings`,
        JSON.stringify([{ bn: probeBaseName(probe.code), bt: simNow / 1000, n: "temp", u: "Cel", v: 33.5 }]),
        { qos: 1 },
      );
      await runner.idle();
    }
    const [alert] = await db().select().from(alerts).where(eq(alerts.zoneId, probe.zoneId));
    expect(alert?.kind).toBe("heat");
    expect(alert?.level).toBe("act_now");
    await worker.idle();

    const keeperMail = await mailTo(keeperEmail);
    expect(keeperMail).toHaveLength(1);
    expect(keeperMail[0]!.subject).toMatch(/Act now: Heat · Test bin/);
    expect(keeperMail[0]!.text).toMatch(/33\.5 °C/);
    // The heat caution is in the mail, after the message.
    expect(keeperMail[0]!.text).toContain(`\n\n${cautionFor("heat")}\n\n`);

    // Fifteen minutes on, nobody has claimed it: the reminder goes out, once, even from two sweeps.
    simNow += 16 * 60_000;
    await Promise.all([runner.sweep(), runner.sweep()]);
    await worker.idle();
    expect(await mailTo(keeperEmail)).toHaveLength(2);
    const ownerMail = await mailTo(ownerEmail);
    expect(ownerMail.filter((m) => m.subject.startsWith("[Wormward] Still unclaimed"))).toHaveLength(1);
    const types = (await db().select().from(alertEvents).where(eq(alertEvents.alertId, alert!.id))).map((e) => `${e.type}:${e.channel ?? ""}`);
    expect(types.filter((t) => t === "sent:email").length).toBeGreaterThanOrEqual(3);
  });
});
