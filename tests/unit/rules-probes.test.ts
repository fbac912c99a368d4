import { describe, expect, it } from "vitest";
import { evaluateZone, refusalFault, replay, valueFault, type ProbeContext, type ProbeSeries } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";
import { rejectionText, summarizeRejections, validateSenmlPayload } from "@/lib/domain/telemetry";

const t0 = Date.UTC(2025, 5, 1, 6, 0, 0);
const MIN = 60_000;
const at = (m: number) => t0 + m * MIN;
const fetida = speciesProfiles["eisenia-fetida"];
const zone = { id: "zone-2", kind: "working", binName: "Flow-through A" } as const;

const minuteSeries = (values: readonly number[], from = 0) => values.map((v, k) => ({ t: at(from + k), v }));
const hold = (v: number, n: number) => Array.from({ length: n }, () => v);
const probe = (over: Partial<ProbeContext> = {}): ProbeContext => ({
  id: 4,
  code: "p-4",
  reportIntervalS: 60,
  lastSeenAt: null,
  metrics: ["temperature", "moisture"],
  ...over,
});

function run(readings: ProbeSeries[], p: ProbeContext, minutes: number, kinds: ("silent_probe" | "probe_fault")[]) {
  const steps = replay(
    { zone, species: fetida, readings, recentFeedings: [], probes: [p], kinds },
    Array.from({ length: minutes }, (_, m) => at(m)),
  );
  const events = steps.flatMap((s) => s.transitions.filter((t) => t.type !== "update").map((t) => ({ minute: (s.at - t0) / MIN, ...t })));
  return { events, brief: events.map((e) => `${e.minute} ${e.type} ${e.kind}`) };
}

describe("silent probe", () => {
  it("raises after three missed reports, at least 10 min, and settles after an hour of on-time reports", () => {
    // readings 0..30, nothing 31..54, again from 55; issue 11: settling on the first reading back made a flaky probe flap
    const temp = [...minuteSeries(hold(22, 31)), ...minuteSeries(hold(22, 80), 55)];
    const { brief, events } = run([{ probeId: 4, metric: "temperature", points: temp }], probe(), 135, ["silent_probe"]);
    expect(brief).toEqual(["40 raise silent_probe", "115 settle silent_probe"]);
    expect(events[0]).toMatchObject({ subject: "probe:4:silent_probe", probeId: 4, level: "heads_up", value: 10 });
    expect(events[0]!.message).toBe("Flow-through A, working zone: probe p-4 has sent nothing since 06:30 (it reports every 1 min).");
    expect(events[1]!.message).toBe("Flow-through A, working zone: probe p-4 is reporting again.");
  });

  it("waits three intervals for a slow probe", () => {
    const temp = minuteSeries([22], 30);
    const slow = probe({ reportIntervalS: 300, label: "front left" });
    const { brief, events } = run([{ probeId: 4, metric: "temperature", points: temp }], slow, 60, ["silent_probe"]);
    expect(brief).toEqual(["45 raise silent_probe"]);
    expect(events[0]!.message).toContain("probe front left has sent nothing since 06:30 (it reports every 5 min)");
  });

  it("a message with no readings still counts as heard; a probe never heard is not silent", () => {
    const base = { zone, species: fetida, recentFeedings: [], openAlerts: [], kinds: ["silent_probe"] as const };
    const readings: ProbeSeries[] = [{ probeId: 4, metric: "temperature", points: minuteSeries([22]) }];
    expect(evaluateZone({ ...base, now: at(15), readings, probes: [probe({ lastSeenAt: at(12) })] })).toEqual([]);
    expect(evaluateZone({ ...base, now: at(15), readings, probes: [probe()] })).toEqual([expect.objectContaining({ type: "raise", kind: "silent_probe" })]);
    expect(evaluateZone({ ...base, now: at(15), readings: [], probes: [probe()] })).toEqual([]);
  });

  it("an owner can ask for readings to continue a while before settling", () => {
    const temp = [...minuteSeries(hold(22, 11)), ...minuteSeries(hold(22, 20), 30)];
    const p = probe();
    const steps = replay(
      {
        zone,
        species: fetida,
        overrides: { silent_probe: { thresholds: { settleMinutes: 5 } } },
        readings: [{ probeId: 4, metric: "temperature", points: temp }],
        recentFeedings: [],
        probes: [p],
        kinds: ["silent_probe"],
      },
      Array.from({ length: 50 }, (_, m) => at(m)),
    );
    const brief = steps.flatMap((s) => s.transitions.filter((t) => t.type !== "update").map((t) => `${(s.at - t0) / MIN} ${t.type}`));
    expect(brief).toEqual(["20 raise", "35 settle"]);
  });
});

describe("probe fault", () => {
  it("the ingest's refusal texts are read back as faults", () => {
    // real rejection reasons, made by the same code the ingest stores them with
    const p = { id: 4, code: "p-4" };
    const payload = JSON.stringify([
      { bn: "urn:dev:wormward:p-4:", bt: t0 / 1000, n: "temp", u: "Cel", v: 85 },
      { n: "temp", u: "Cel", v: 130 },
      { n: "moisture", u: "/100", v: 140 },
      { n: "nope", v: 1 },
    ]);
    const reasons = validateSenmlPayload(p, payload, { now: new Date(t0) }).rejections.map(rejectionText);
    expect(reasons).toHaveLength(4);
    expect(reasons.map(refusalFault)).toEqual([
      { suffix: "temp", value: 85, cause: "error-code" },
      { suffix: "temp", value: 130, cause: "out-of-range" },
      { suffix: "moisture", value: 140, cause: "out-of-range" },
      null,
    ]);
    expect(refusalFault("malformed-json: payload is not UTF-8 JSON (RFC 8428 §5)")).toBeNull();
    expect(valueFault("temperature", -127)).toBe("error-code");
    expect(valueFault("temperature", 21.5)).toBeNull();
  });

  it("refused error codes for 5 min raise a fault; 15 min of good readings settle it", () => {
    const payload = JSON.stringify([{ bn: "urn:dev:wormward:p-4:", n: "temp", u: "Cel", v: 85 }]);
    const reason = rejectionText(validateSenmlPayload({ id: 4, code: "p-4" }, payload, { now: new Date(t0) }).rejections[0]!);
    // good temperatures 0..19, refused 85 °C at 20..39 (nothing stored), good again from 40
    const refusals = Array.from({ length: 20 }, (_, k) => ({ at: at(20 + k), reason }));
    const temp = [...minuteSeries(hold(21, 20)), ...minuteSeries(hold(21, 40), 40)];
    const { brief, events } = run([{ probeId: 4, metric: "temperature", points: temp }], probe({ refusals }), 80, ["probe_fault", "silent_probe"]);
    expect(brief).toEqual(["25 raise probe_fault", "55 settle probe_fault"]);
    expect(events[0]).toMatchObject({ subject: "probe:4:probe_fault", value: 85, details: { cause: "error-code", metric: "temperature" } });
    expect(events[0]!.message).toBe("Flow-through A, working zone: probe p-4 sends 85 for temperature, a sensor error code, not a reading. Check its wiring.");
    expect(events[1]!.message).toBe("Flow-through A, working zone: probe p-4 reads normally again.");
  });

  it("a fault behind another refusal in the same message's row still raises", () => {
    // One rejected_messages row per message: an unknown metric first, then the error code.
    const payload = JSON.stringify([
      { bn: "urn:dev:wormward:p-4:", n: "ph", v: 7 },
      { n: "temp", u: "Cel", v: 85 },
    ]);
    const row = summarizeRejections(validateSenmlPayload({ id: 4, code: "p-4" }, payload, { now: new Date(t0) }).rejections)!;
    expect(row.records).toBe(2);
    expect(refusalFault(row.reason)).toBeNull(); // the first line alone is no fault
    const refusals = Array.from({ length: 20 }, (_, k) => ({ at: at(20 + k), reason: row.reason }));
    const temp = [...minuteSeries(hold(21, 20)), ...minuteSeries(hold(21, 40), 40)];
    const { brief } = run([{ probeId: 4, metric: "temperature", points: temp }], probe({ refusals }), 80, ["probe_fault", "silent_probe"]);
    expect(brief).toEqual(["25 raise probe_fault", "55 settle probe_fault"]);
  });

  it("one refused glitch is not a fault", () => {
    const payload = JSON.stringify([{ bn: "urn:dev:wormward:p-4:", n: "temp", u: "Cel", v: -127 }]);
    const reason = rejectionText(validateSenmlPayload({ id: 4, code: "p-4" }, payload, { now: new Date(t0) }).rejections[0]!);
    const temp = minuteSeries(hold(21, 40));
    expect(run([{ probeId: 4, metric: "temperature", points: temp }], probe({ refusals: [{ at: at(20), reason }] }), 40, ["probe_fault"]).brief).toEqual([]);
  });

  it("a stored value outside the sensor's range is a fault too", () => {
    // moisture is a share of wet mass: 0–100 % (lib/domain/metrics.ts)
    const moisture = minuteSeries([...hold(75, 10), ...hold(104, 10)]);
    const { events, brief } = run([{ probeId: 4, metric: "moisture", points: moisture }], probe(), 20, ["probe_fault"]);
    expect(brief).toEqual(["15 raise probe_fault"]);
    expect(events[0]!.message).toBe(
      "Flow-through A, working zone: probe p-4 sends 104 % for moisture, outside what the sensor can measure (0…100 %). Check the probe.",
    );
  });

  it("a temperature that has not moved by one 1/16 °C step for 6 h is stuck; it settles 15 min after it moves", () => {
    // 21.5 °C with wobble below one step (0.06 < 0.0625) from minute 0; at minute 400 it moves one full step
    const values = [...Array.from({ length: 400 }, (_, m) => (m % 2 ? 21.5 : 21.56)), ...hold(21.5625, 30)];
    const { brief, events } = run([{ probeId: 4, metric: "temperature", points: minuteSeries(values) }], probe(), 430, ["probe_fault"]);
    expect(brief).toEqual(["360 raise probe_fault", "415 settle probe_fault"]);
    expect(events[0]!.details).toMatchObject({ cause: "stuck", stuckSince: at(0), metric: "temperature" });
    expect(events[0]!.message).toBe(
      "Flow-through A, working zone: probe p-4 has read temperature 21.56 °C without change since 06:00 (6 h); the sensor may be stuck.",
    );
  });

  it("a probe's own step sets 'no change': a whole-percent probe is stuck only after 48 h, a 0.1 % probe after 6 h (issue 11)", () => {
    const base = { zone, species: fetida, recentFeedings: [], openAlerts: [], kinds: ["probe_fault"] as const };
    const moisture = (values: number[]): ProbeSeries[] => [{ probeId: 4, metric: "moisture", points: values.map((v, k) => ({ t: at(5 * k), v })) }];
    const five = probe({ reportIntervalS: 300, metrics: ["moisture"] });
    // a day of a living bed at 0.1 % steps, then 7 h at one value: stuck
    const fine = [...Array.from({ length: 288 }, (_, k) => 78 + (k % 3) * 0.1), ...hold(78.4, 84)];
    expect(evaluateZone({ ...base, now: at(5 * (fine.length - 1)), readings: moisture(fine), probes: [five] })).toEqual([
      expect.objectContaining({ type: "raise", details: expect.objectContaining({ cause: "stuck", metric: "moisture" }) }),
    ]);
    // whole percent: 78 for 30 h after a day of 78/79 is a steady bed, not a stuck sensor
    const whole = [...Array.from({ length: 288 }, (_, k) => (k % 7 === 0 ? 79 : 78)), ...hold(78, 360)];
    expect(evaluateZone({ ...base, now: at(5 * (whole.length - 1)), readings: moisture(whole), probes: [five] })).toEqual([]);
  });

  it("a living bed is never stuck, and an ammonia reading of 0 ppm for hours is no fault", () => {
    const temp = minuteSeries(Array.from({ length: 500 }, (_, m) => 21 + 0.3 * Math.sin(m / 30)));
    const nh3 = minuteSeries(hold(0, 500));
    const p = probe({ metrics: ["temperature", "ammonia"] });
    const readings: ProbeSeries[] = [
      { probeId: 4, metric: "temperature", points: temp },
      { probeId: 4, metric: "ammonia", points: nh3 },
    ];
    const out = evaluateZone({ now: at(499), zone, species: fetida, readings, recentFeedings: [], probes: [p], openAlerts: [], kinds: ["probe_fault"] });
    expect(out).toEqual([]);
  });

  it("a raw moisture count stuck for 6 h is caught with its own step", () => {
    const raw = minuteSeries(hold(512, 361));
    const out = evaluateZone({
      now: at(360),
      zone,
      species: fetida,
      readings: [{ probeId: 4, metric: "moisture-raw", points: raw }],
      recentFeedings: [],
      probes: [probe({ metrics: ["moisture-raw"] })],
      openAlerts: [],
      kinds: ["probe_fault"],
    });
    expect(out).toEqual([expect.objectContaining({ type: "raise", value: 512, details: expect.objectContaining({ cause: "stuck", metric: "moisture-raw" }) })]);
  });
});
