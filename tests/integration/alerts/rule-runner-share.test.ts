// The rule runner gives way when evaluations are slow: after one that took longer than 20 ms, the
// next waits (1 − share) / share times as long, so evaluating days of readings back to back never
// takes the database from the writers. Real runner, real LISTEN/NOTIFY; the zone evaluation is
// replaced by one that takes a known time, since what is tested is the runner's timing.
import { afterEach, describe, expect, it } from "vitest";
import { insertReadings } from "@/db/queries/readings";
import { createRuleRunner, type RuleRunner } from "@/ingest/rule-runner";
import { createProbes } from "../ingest/helpers";

delete process.env.VAPID_PUBLIC_KEY;
delete process.env.SMTP_PORT;

let runner: RuleRunner | null = null;
afterEach(async () => {
  await runner?.stop();
  runner = null;
});

type Run = { zone: string; start: number; end: number };

async function timedRuns(share: number, evaluationMs: number, untilAll = true) {
  const runs: Run[] = [];
  runner = createRuleRunner({
    coalesceMs: 20,
    maxShare: share,
    evaluateZone: async (zone) => {
      const start = performance.now();
      await new Promise((r) => setTimeout(r, evaluationMs));
      runs.push({ zone, start, end: performance.now() });
      return [];
    },
  });
  await runner.listening();
  // Three zones (one probe each) touched by one committed batch.
  const probes = [...(await createProbes(1)), ...(await createProbes(1)), ...(await createProbes(1))];
  await insertReadings(probes.map((p) => ({ probeId: p.id, metric: "temperature" as const, ts: new Date(Date.now() - 60_000), value: 22 })));
  if (untilAll) await runner.idle();
  else while (runs.length === 0) await new Promise((r) => setTimeout(r, 10));
  return { runs, zones: probes.map((p) => p.zoneId) };
}

describe("the rule runner's share of the time", () => {
  it("rests after each slow evaluation: with a share of 0.25, three times as long as it took", async () => {
    const { runs, zones } = await timedRuns(0.25, 60);
    expect(zones.every((z) => runs.some((r) => r.zone === z))).toBe(true);
    // Every evaluation (these and any other test's zones heard meanwhile) is followed by its rest.
    for (let i = 1; i < runs.length; i++) {
      const took = runs[i - 1]!.end - runs[i - 1]!.start;
      expect(runs[i]!.start - runs[i - 1]!.end).toBeGreaterThanOrEqual(took * 3 * 0.95);
    }
    expect(runs.length).toBeGreaterThanOrEqual(3);
  });

  it("stops at once even while resting", async () => {
    const { runs } = await timedRuns(0.01, 50, false);
    // A share of 0.01 rests about 5 s after the first evaluation; stop() does not wait for it.
    const t = performance.now();
    await runner!.stop();
    runner = null;
    expect(performance.now() - t).toBeLessThan(1_000);
    expect(runs).toHaveLength(1);
  });
});
