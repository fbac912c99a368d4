// Two delivery workers (as on two ingest nodes) over one outbox: every delivery is claimed by one
// of them (FOR UPDATE SKIP LOCKED) and the fake push service receives each exactly once.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { claimDeliveries, listDeliveries } from "@/db/queries/deliveries";
import { alertEvents } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { topicOf } from "@/lib/server/alerts/deliver";
import { notifyAlert } from "@/lib/server/alerts/notify";
import { makeVapidKeys } from "@/lib/server/push/push";
import { newSubscriber, pushMessagesFor, type TestSubscriber } from "../../helpers/push";
import { addKeeper, raiseActNow } from "./helpers";
import { createProbes, waitFor } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
delete process.env.SMTP_PORT;

const N = 40;
const workers: DeliveryWorker[] = [];
afterAll(async () => {
  for (const w of workers) await w.stop();
});

let phones: TestSubscriber[] = [];
let alertId: string;
beforeAll(async () => {
  const [probe] = await createProbes(1);
  phones = await Promise.all(Array.from({ length: N }, () => newSubscriber()));
  // Ten keepers with four phones each.
  for (let k = 0; k < N / 4; k++) await addKeeper(probe!, `crew-${k}-${probe!.code}@example.org`, `Keeper ${k}`, phones.slice(k * 4, k * 4 + 4));
  const alert = await raiseActNow(probe!, "heat", 35, "°C");
  alertId = alert.id;
  // Queued with no worker running, then twice over: the repeat adds no row (dedupe key).
  expect(await notifyAlert(alert, "raised")).toMatchObject({ queued: N });
  await notifyAlert(alert, "raised");
  expect(await listDeliveries({ alertId })).toHaveLength(N);
});

describe("the delivery outbox", () => {
  it("two delivery workers send each delivery once", async () => {
    // Both start at the same moment and race for the same rows.
    workers.push(createDeliveryWorker({ concurrency: 4, perFarm: N, pollMs: 20 }), createDeliveryWorker({ concurrency: 4, perFarm: N, pollMs: 20 }));
    await waitFor(
      "every delivery to end",
      () => listDeliveries({ alertId }),
      (rows) => rows.every((d) => d.state === "sent"),
      30_000,
    );
    await Promise.all(workers.map((w) => w.idle()));

    const rows = await listDeliveries({ alertId });
    expect(rows).toHaveLength(N);
    expect(rows.map((d) => d.attempts)).toEqual(Array(N).fill(1));
    const received = await Promise.all(phones.map((p) => pushMessagesFor(p.id)));
    expect(received.map((m) => m.length)).toEqual(Array(N).fill(1));
    // RFC 8030 §5.4: each delivery carries a Topic of its own, so a resend after a crash would
    // replace, not add to, a message the push service still holds.
    const topics = received.map((m) => (m[0] as unknown as { headers: { topic: string | null } }).headers.topic);
    expect(topics.every((t) => typeof t === "string" && /^[A-Za-z0-9_-]{32}$/.test(t))).toBe(true);
    expect(new Set(topics).size).toBe(N);
    const sent = (await db().select().from(alertEvents).where(eq(alertEvents.alertId, alertId))).filter((e) => e.type === "sent");
    expect(sent).toHaveLength(N);
  });
});

describe("a worker that dies mid-send", () => {
  it("leaves its delivery to another worker once its lease runs out, under the same Topic", async () => {
    const phone = await newSubscriber();
    const [probe] = await createProbes(1);
    await addKeeper(probe!, `lease-${probe!.code}@example.org`, "Keeper", [phone]);
    const alert = await raiseActNow(probe!, "soggy", 92, "%");
    // The running workers are busy elsewhere for this test: stop them, then take the row as a worker
    // would and "die" (never end it), with a short lease.
    for (const w of workers.splice(0)) await w.stop();
    await notifyAlert(alert, "raised");
    const [taken] = await claimDeliveries(10, 500, 10);
    expect(taken?.alertId).toBe(alert.id);
    const survivor = createDeliveryWorker({ pollMs: 50 });
    workers.push(survivor);
    await new Promise((r) => setTimeout(r, 200));
    expect(await pushMessagesFor(phone.id)).toHaveLength(0); // still the dead worker's
    const [done] = await waitFor(
      "the row to be sent",
      () => listDeliveries({ alertId: alert.id }),
      (r) => r[0]?.state === "sent",
      10_000,
    );
    expect(done!.attempts).toBe(2);
    const got = (await pushMessagesFor(phone.id)) as unknown as { headers: { topic: string } }[];
    expect(got).toHaveLength(1);
    // The Topic comes from the delivery itself, so the dead worker's send (had it gone out) and this
    // one would carry the same and the push service keeps one (RFC 8030 §5.4).
    expect(got[0]!.headers.topic).toBe(topicOf(done!.dedupeKey));
  });
});
