// Two ingest nodes (two rule runners over one database) evaluating the same zone at the same
// moment raise one alert, send it once (each node's delivery worker over the one outbox), and a
// restart (a fresh runner) does not raise it again.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { raiseAlert } from "@/db/queries/alerts";
import { insertReadings } from "@/db/queries/readings";
import { alertEvents, alerts, memberships, users } from "@/db/schema";
import { createDeliveryWorker, type DeliveryWorker } from "@/ingest/delivery-worker";
import { createRuleRunner, type RuleRunner } from "@/ingest/rule-runner";
import { createProbes, type TestProbe } from "../ingest/helpers";

delete process.env.VAPID_PUBLIC_KEY;
process.env.SMTP_PORT = String(inject("smtpPort"));

let probe: TestProbe;
const runners: RuleRunner[] = [];
const workers: DeliveryWorker[] = [];

beforeAll(async () => {
  probe = (await createProbes(1))[0]!;
  const [u] = await db()
    .insert(users)
    .values({ email: `two-nodes-${probe.code}@example.org`, name: "Keeper", passwordHash: "x" })
    .returning();
  await db().insert(memberships).values({ userId: u!.id, farmId: probe.farmId, role: "keeper" });
  const now = Date.now();
  await insertReadings(
    Array.from({ length: 15 }, (_, i) => ({ probeId: probe.id, metric: "temperature" as const, ts: new Date(now - (14 - i) * 60_000), value: 33 })),
  );
});
afterAll(async () => {
  for (const r of runners) await r.stop();
  for (const w of workers) await w.stop();
});

describe("two ingest nodes", () => {
  it("five simultaneous raises of one subject store one open alert (the partial unique index)", async () => {
    const binId = ((await db().execute(`select bin_id as "binId" from zones where id = '${probe.zoneId}'`)).rows[0] as { binId: string }).binId;
    const subject = `zone:${probe.zoneId}:soggy`;
    const made = await Promise.all(
      Array.from({ length: 5 }, () =>
        raiseAlert({
          farmId: probe.farmId,
          binId,
          zoneId: probe.zoneId,
          probeId: null,
          subject,
          kind: "soggy",
          level: "heads_up",
          value: 91,
          message: "91 %",
          details: {},
        }),
      ),
    );
    expect(made.filter(Boolean)).toHaveLength(1);
    expect(await db().select().from(alerts).where(eq(alerts.subject, subject))).toHaveLength(1);
  });

  it("raise one alert between them, send it once, and a restarted node does not raise it again", async () => {
    const [a, b] = [createRuleRunner({ sweepMs: 3_600_000 }), createRuleRunner({ sweepMs: 3_600_000 })];
    runners.push(a, b);
    workers.push(createDeliveryWorker({ pollMs: 50 }), createDeliveryWorker({ pollMs: 50 }));
    const [ta, tb] = await Promise.all([a.evaluate(probe.zoneId), b.evaluate(probe.zoneId)]);
    expect([...ta, ...tb].filter((t) => t.type === "raise").length).toBeGreaterThanOrEqual(1);
    const rows = (await db().select().from(alerts).where(eq(alerts.zoneId, probe.zoneId))).filter((r) => r.kind === "heat");
    expect(rows).toHaveLength(1);
    await Promise.all(workers.map((w) => w.idle()));
    const events = await db().select().from(alertEvents).where(eq(alertEvents.alertId, rows[0]!.id));
    expect(events.filter((e) => e.type === "raised")).toHaveLength(1);
    expect(events.filter((e) => e.type === "sent" && e.channel === "email")).toHaveLength(1);

    const restarted = createRuleRunner({ sweepMs: 3_600_000 });
    runners.push(restarted);
    const again = await restarted.evaluate(probe.zoneId);
    expect(again.filter((t) => t.type === "raise")).toHaveLength(0);
    expect((await db().select().from(alerts).where(eq(alerts.zoneId, probe.zoneId))).filter((r) => r.kind === "heat")).toHaveLength(1);
  });
});
