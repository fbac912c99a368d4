import { describe, expect, it } from "vitest";
import { RULE_PARAMETERS, evaluateZone, replay, type FeedingContext, type ProbeContext, type ProbeSeries } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";

const t0 = Date.UTC(2025, 5, 1, 6, 0, 0);
const MIN = 60_000;
const HOUR = 3_600_000;
const at = (m: number) => t0 + m * MIN;
const fetida = speciesProfiles["eisenia-fetida"];
const zone = { id: "zone-1", kind: "fresh", binName: "Long Bed North" } as const;

const minuteSeries = (values: readonly number[]) => values.map((v, m) => ({ t: at(m), v }));
const hold = (v: number, n: number) => Array.from({ length: n }, () => v);
const tempProbe: ProbeContext = { id: 7, code: "p-7", reportIntervalS: 60, lastSeenAt: null, metrics: ["temperature"] };
const nh3Probe: ProbeContext = { id: 9, code: "p-9", reportIntervalS: 60, lastSeenAt: null, metrics: ["ammonia", "temperature"] };

function run(readings: ProbeSeries[], probes: ProbeContext[], feedings: FeedingContext[], minutes: number) {
  const steps = replay(
    { zone, species: fetida, readings, recentFeedings: feedings, probes, kinds: ["ammonia"] },
    Array.from({ length: minutes }, (_, m) => at(m)),
  );
  const events = steps.flatMap((s) => s.transitions.filter((t) => t.type !== "update").map((t) => ({ minute: (s.at - t0) / MIN, ...t })));
  return { events, brief: events.map((e) => `${e.minute} ${e.type} ${e.level}`) };
}

describe("ammonia where a probe measures it", () => {
  it("raises at 10 ppm held 10 min, escalates at 25 ppm, settles after 15 min at or below 8 ppm", () => {
    // the ppm lines are our own (common practice / NIOSH REL from memory): no published worm figure was verified
    const nh3 = [...hold(5, 10), ...hold(12, 20), ...hold(26, 20), ...hold(8.5, 20), ...hold(8, 20)];
    const { brief, events } = run([{ probeId: 9, metric: "ammonia", points: minuteSeries(nh3) }], [nh3Probe], [], nh3.length);
    expect(brief).toEqual(["20 raise heads_up", "40 escalate act_now", "85 settle act_now"]);
    expect(events[0]).toMatchObject({ subject: "zone:zone-1:ammonia", value: 12, probeId: 9, details: { mode: "measured" } });
    expect(events[0]!.message).toBe("Long Bed North, fresh zone: ammonia 12 ppm, at or above 10 ppm.");
    expect(events[1]!.message).toContain("ammonia 26 ppm, at or above 25 ppm.");
  });

  it("does not fall back to a guess when the ammonia probe has simply not reported", () => {
    const feeding = { at: at(0), zoneId: "zone-1", mixCn: 12, mixMoisturePct: 90 };
    const temp = { probeId: 9, metric: "temperature" as const, points: minuteSeries(hold(24, 60)) };
    expect(run([temp], [nh3Probe], [feeding], 60).brief).toEqual([]);
  });
});

describe("ammonia risk where no probe measures it", () => {
  const flat = (n: number): ProbeSeries => ({ probeId: 7, metric: "temperature", points: minuteSeries(hold(22, n)) });

  it("a nitrogen-rich, wet feeding raises a heads-up after 10 min, explained in words", () => {
    // Cornell Waste Management Institute, "Compost Chemistry" (V): below ~30:1 excess nitrogen is lost as ammonia
    const feeding = { at: at(0), zoneId: "zone-1", mixCn: 18, mixMoisturePct: 88, totalKg: 10 };
    const { brief, events } = run([flat(60)], [tempProbe], [feeding], 60);
    expect(brief).toEqual(["10 raise heads_up"]);
    expect(events[0]!.value).toBe(18);
    expect(events[0]!.message).toBe(
      "Long Bed North, fresh zone: ammonia risk. The feeding at 06:00 was rich in nitrogen (C:N 18, below 25:1; below about 30:1 the extra nitrogen leaves as ammonia) and its mix was wet (88.0 %). No probe here measures ammonia; check the smell and air the bin.",
    );
    expect(events[0]!.details).toMatchObject({ mode: "estimate", lowCn: true, wet: true, mixCn: 18, feedingAt: at(0) });
    // once an hour of readings shows the rate, the message says so
    const later = replay({ zone, species: fetida, readings: [flat(90)], recentFeedings: [feeding], probes: [tempProbe], kinds: ["ammonia"], openAlerts: [] }, [
      at(89),
    ]);
    expect(later[0]!.transitions[0]!.message).toContain("its mix was wet (88.0 %) and the zone is not warming.");
  });

  it("a nitrogen-rich feeding that is not wet raises only once the zone warms", () => {
    const feeding = { at: at(0), zoneId: "zone-1", mixCn: 18, mixMoisturePct: 80 };
    expect(run([flat(120)], [tempProbe], [feeding], 120).brief).toEqual([]);
    // warming 1.5 °C/h: the hour's rate is known from minute 60, then 10 min held
    const warming: ProbeSeries = { probeId: 7, metric: "temperature", points: minuteSeries(Array.from({ length: 120 }, (_, m) => 20 + (1.5 * m) / 60)) };
    const { brief, events } = run([warming], [tempProbe], [feeding], 120);
    expect(brief).toEqual(["70 raise heads_up"]);
    expect(events[0]!.message).toContain("the zone is warming 1.5 °C/h, so the feed is breaking down fast");
    expect(events[0]!.message).not.toContain("wet");
  });

  it("a balanced feeding is no risk, however wet", () => {
    expect(run([flat(60)], [tempProbe], [{ at: at(0), zoneId: "zone-1", mixCn: 30, mixMoisturePct: 90 }], 60).brief).toEqual([]);
    // a feeding without a mix check says nothing either way
    expect(run([flat(60)], [tempProbe], [{ at: at(0), zoneId: "zone-1" }], 60).brief).toEqual([]);
  });

  it("is never act now: it is a guess", () => {
    const hot: ProbeSeries = { probeId: 7, metric: "temperature", points: minuteSeries(Array.from({ length: 300 }, (_, m) => 20 + (4 * m) / 60)) };
    const { events } = run([hot], [tempProbe], [{ at: at(0), zoneId: "zone-1", mixCn: 10, mixMoisturePct: 92 }], 300);
    expect(events.map((e) => e.level)).toEqual(["heads_up"]);
  });

  it("a wet mix alone counts for 24 h, then the estimate settles 15 min later (issue 11: it held open the whole watch)", () => {
    // fed 24 h − 20 min before minute 0: risky through minute 20, calm from minute 21 (riskWetHours, common practice)
    const feeding = { at: at(0) - 24 * HOUR + 20 * MIN, zoneId: null, mixCn: 15, mixMoisturePct: 90 };
    const { brief, events } = run([flat(60)], [tempProbe], [feeding], 60);
    expect(brief).toEqual(["10 raise heads_up", "36 settle heads_up"]);
    expect(events[1]!.message).toBe("Long Bed North, fresh zone: ammonia risk has passed; the zone is not warming and the wet feeding has settled.");
  });

  it("a wet mix stops counting once the zone cools, and the estimate settles", () => {
    // 22 °C for an hour, then falling 0.6 °C/h: the hour's rate passes −0.1 °C/h within minutes
    const temps = Array.from({ length: 150 }, (_, m) => (m < 60 ? 22 : 22 - (0.6 * (m - 60)) / 60));
    const cooling: ProbeSeries = { probeId: 7, metric: "temperature", points: minuteSeries(temps) };
    const { events } = run([cooling], [tempProbe], [{ at: at(0), zoneId: "zone-1", mixCn: 15, mixMoisturePct: 90 }], 150);
    expect(events.map((e) => e.type)).toEqual(["raise", "settle"]);
    expect(events[1]!.minute).toBeLessThan(150);
  });

  it("settles 15 min after the feeding passes 72 h", () => {
    // an owner who counts a wet mix for the whole watch: fed 72 h − 20 min before minute 0
    const feeding = { at: at(0) - 72 * HOUR + 20 * MIN, zoneId: null, mixCn: 15, mixMoisturePct: 90 };
    const steps = replay(
      {
        zone,
        species: fetida,
        overrides: { ammonia: { thresholds: { riskWetHours: 100 } } },
        readings: [flat(60)],
        recentFeedings: [feeding],
        probes: [tempProbe],
        kinds: ["ammonia"],
      },
      Array.from({ length: 60 }, (_, m) => at(m)),
    );
    const events = steps.flatMap((s) => s.transitions.filter((t) => t.type !== "update").map((t) => ({ minute: (s.at - t0) / MIN, ...t })));
    expect(events.map((e) => `${e.minute} ${e.type} ${e.level}`)).toEqual(["10 raise heads_up", "36 settle heads_up"]);
    expect(events[1]!.message).toBe("Long Bed North, fresh zone: ammonia risk has passed; the nitrogen-rich feeding is more than 72 h old.");
  });

  it("judges the logbook alone when no probe reads temperature", () => {
    const base = { zone, species: fetida, readings: [], probes: [], openAlerts: [], kinds: ["ammonia"] as const };
    const wet = [{ at: at(0), zoneId: "zone-1", mixCn: 16, mixMoisturePct: 89 }];
    const out = evaluateZone({ ...base, now: at(5), recentFeedings: wet });
    expect(out).toEqual([expect.objectContaining({ type: "raise", level: "heads_up", probeId: null, value: 16 })]);
    expect(out[0]!.message).toContain("its mix was wet (89.0 %) and no probe here reads temperature");
    // dry enough: no risk without a temperature to watch
    expect(evaluateZone({ ...base, now: at(5), recentFeedings: [{ ...wet[0]!, mixMoisturePct: 80 }] })).toEqual([]);
  });

  it("the C:N line is the owner's to move", () => {
    const feeding = { at: at(0), zoneId: "zone-1", mixCn: 27, mixMoisturePct: 90 };
    expect(run([flat(30)], [tempProbe], [feeding], 30).brief).toEqual([]);
    const steps = replay(
      {
        zone,
        species: fetida,
        overrides: { ammonia: { thresholds: { riskCnBelow: 30 } } },
        readings: [flat(30)],
        recentFeedings: [feeding],
        probes: [tempProbe],
        kinds: ["ammonia"],
      },
      [at(10)],
    );
    expect(steps[0]!.transitions).toEqual([expect.objectContaining({ type: "raise" })]);
    expect(steps[0]!.transitions[0]!.message).toContain("C:N 27, below 30:1");
    // the default stays under Cornell's ~30:1 and names it
    expect(RULE_PARAMETERS.ammonia.find((p) => p.key === "riskCnBelow")!.source).toContain("Cornell");
  });
});
