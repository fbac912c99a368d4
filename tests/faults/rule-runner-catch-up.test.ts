// The rule runner hears of readings by NOTIFY only; readings committed while no runner listened (its
// process restarting, the database restarting under it) are judged by the catch-up that ingest/main.ts
// turns on: every monitored zone evaluated once each time the LISTEN is in place.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { insertReadings } from "@/db/queries/readings";
import { alerts } from "@/db/schema";
import { createRuleRunner, type RuleRunner } from "@/ingest/rule-runner";
import { createProbes, type TestProbe } from "../integration/ingest/helpers";

let probe: TestProbe;
const runners: RuleRunner[] = [];

beforeAll(async () => {
  [probe] = (await createProbes(1)) as [TestProbe];
  // 15 minutes at 33 °C, committed before any runner listens: the heat rule's act-now line is 30 °C
  // for the test probe's red wigglers, held 10 minutes before raising (lib/domain/rules/params.ts).
  const now = Date.now();
  await insertReadings(
    Array.from({ length: 16 }, (_, i) => ({ probeId: probe.id, metric: "temperature" as const, ts: new Date(now - (15 - i) * 60_000), value: 33 })),
  );
});
afterAll(async () => {
  for (const r of runners) await r.stop();
});

const heatAlerts = () =>
  db()
    .select()
    .from(alerts)
    .where(and(eq(alerts.zoneId, probe.zoneId), eq(alerts.kind, "heat")));

describe("rule runner catch-up", () => {
  it("a runner without it never hears of readings committed before it listened", async () => {
    const r = createRuleRunner({ coalesceMs: 10, sweepMs: 3_600_000 });
    runners.push(r);
    await r.idle();
    expect(await heatAlerts()).toHaveLength(0);
  });

  it("with it, a runner that starts after those readings raises their alert, once", async () => {
    const r = createRuleRunner({ coalesceMs: 10, sweepMs: 3_600_000, catchUp: true });
    runners.push(r);
    await r.idle();
    const rows = await heatAlerts();
    expect(rows).toHaveLength(1);
    expect(rows[0]!.level).toBe("act_now");
    // A second runner catching up (a second workers process) raises nothing more.
    const again = createRuleRunner({ coalesceMs: 10, sweepMs: 3_600_000, catchUp: true });
    runners.push(again);
    await again.idle();
    expect(await heatAlerts()).toHaveLength(1);
  });
});
