// Readings that arrive by any door (here a direct insert, as the HTTP ingest and CSV import do)
// reach the rule runner through PostgreSQL LISTEN/NOTIFY and can raise an alert.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { insertReadings } from "@/db/queries/readings";
import { alerts } from "@/db/schema";
import { createRuleRunner, type RuleRunner } from "@/ingest/rule-runner";
import { createProbes, waitFor, type TestProbe } from "../ingest/helpers";

delete process.env.VAPID_PUBLIC_KEY;
delete process.env.SMTP_PORT;

let probe: TestProbe;
let runner: RuleRunner;

beforeAll(async () => {
  probe = (await createProbes(1))[0]!;
  runner = createRuleRunner({ coalesceMs: 20 });
  await runner.listening();
});
afterAll(async () => {
  await runner?.stop();
});

describe("readings from outside the broker", () => {
  it("a committed batch of hot readings raises a heat alert without any MQTT message", async () => {
    const now = Date.now();
    const rows = Array.from({ length: 15 }, (_, i) => ({
      probeId: probe.id,
      metric: "temperature" as const,
      ts: new Date(now - (14 - i) * 60_000),
      value: 34,
    }));
    await insertReadings(rows);
    const found = await waitFor(
      "a heat alert",
      () => db().select().from(alerts).where(eq(alerts.zoneId, probe.zoneId)),
      (a) => a.length > 0,
      10_000,
    );
    expect(found[0]).toMatchObject({ kind: "heat", level: "act_now", state: "raised" });
  });
});
