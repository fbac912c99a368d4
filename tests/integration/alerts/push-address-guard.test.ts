// The address check at send time: a host the allow-list names but whose name resolves into our
// own network is refused in the connection's own DNS lookup, before any socket is opened; so is a
// stored subscription on a private address. Through sendPush and through a real delivery worker.
import net from "node:net";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { listDeliveries } from "@/db/queries/deliveries";
import { alertEvents, pushSubscriptions } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { notifyAlert } from "@/lib/server/alerts/notify";
import { makeVapidKeys, sendPush } from "@/lib/server/push/push";
import { newSubscriber } from "../../helpers/push";
import { addKeeper, raiseActNow } from "./helpers";
import { createProbes } from "../ingest/helpers";

const vapid = makeVapidKeys();
process.env.VAPID_PUBLIC_KEY = vapid.publicKey;
process.env.VAPID_PRIVATE_KEY = vapid.privateKey;
process.env.PUSH_CA_FILE = inject("pushCaFile");
// An operator lists "localhost" as a push service (by mistake, or a name that later re-points).
process.env.PUSH_SERVICE_HOSTS = "localhost";
delete process.env.SMTP_PORT;

// Stands where a push service would: counts every TCP connection that reaches it.
let trap: net.Server;
let connections = 0;
let port = 0;
let worker: DeliveryWorker;

beforeAll(async () => {
  trap = net.createServer((s) => {
    connections += 1;
    s.destroy();
  });
  await new Promise<void>((r) => trap.listen(0, "127.0.0.1", r));
  port = (trap.address() as net.AddressInfo).port;
  worker = createDeliveryWorker({ pollMs: 100, backoffMs: 50 });
});
afterAll(async () => {
  await worker?.stop();
  await new Promise((r) => trap?.close(r));
});

describe("the address check before each send", () => {
  it("a listed push service whose name resolves to a loopback address is refused before any connection", async () => {
    const keys = (await newSubscriber()).json.keys;
    const r = await sendPush(
      { endpoint: `https://localhost:${port}/push/abc`, keys },
      { title: "x" },
      {
        vapid: { ...vapid, subject: "mailto:alerts@wormward.test" },
        allow: { hosts: ["localhost"], fakeOrigin: inject("pushServiceUrl") },
        timeoutMs: 2_000,
      },
    );
    expect(r).toEqual({ ok: false, gone: false, retry: false, status: null, reason: "the push service's name points inside a private network" });
    expect(connections).toBe(0);
    // The same trap, named by its address with the check skipped as for the fake, is reachable:
    // the count above is not zero because nothing could connect.
    const reached = await sendPush(
      { endpoint: `https://127.0.0.1:${port}/push/abc`, keys },
      { title: "x" },
      {
        vapid: { ...vapid, subject: "mailto:alerts@wormward.test" },
        allow: { hosts: [], fakeOrigin: `https://127.0.0.1:${port}` },
        timeoutMs: 2_000,
      },
    );
    expect(reached).toMatchObject({ ok: false, status: null, retry: true });
    expect(connections).toBe(1);
    connections = 0;
  });

  it("a delivery worker refuses stored subscriptions on such names and on private addresses, once, without retrying", async () => {
    const [probe] = await createProbes(1);
    const userId = await addKeeper(probe!, `guard-${probe!.code}@example.org`, "Guarded");
    const keys = (await newSubscriber()).json.keys;
    // Rows as an older build stored them, before the allow-list: straight into the table.
    for (const endpoint of [`https://localhost:${port}/push/abc`, "https://10.20.30.40/push/abc", "https://[::ffff:127.0.0.1]:1/push/abc"]) {
      await db().insert(pushSubscriptions).values({ userId, endpoint, p256dh: keys.p256dh, auth: keys.auth });
    }
    const alert = await raiseActNow(probe!, "heat", 34, "°C");
    expect(await notifyAlert(alert, "raised")).toMatchObject({ queued: 3 });
    worker.kick();
    await worker.idle({ includeRetries: true });

    const rows = await listDeliveries({ alertId: alert.id });
    expect(rows.map((d) => [d.state, d.attempts, d.lastStatus])).toEqual([
      ["failed", 1, null],
      ["failed", 1, null],
      ["failed", 1, null],
    ]);
    expect(rows.map((d) => d.lastReason).sort()).toEqual([
      "the push service's name points inside a private network",
      "this push endpoint is not one we send to",
      "this push endpoint is not one we send to",
    ]);
    const failed = (await db().select().from(alertEvents).where(eq(alertEvents.alertId, alert.id))).filter((e) => e.type === "send_failed");
    expect(failed).toHaveLength(3);
    expect(connections).toBe(0);
  });
});
