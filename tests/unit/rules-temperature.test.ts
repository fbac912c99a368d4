import { describe, expect, it } from "vitest";
import {
  evaluateZone,
  replay,
  resolveRules,
  type FeedingContext,
  type OpenAlert,
  type ProbeSeries,
  type RuleOverrides,
  type Transition,
} from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";
import { ratePerHour } from "@/lib/domain/trend";

const t0 = Date.UTC(2025, 5, 1, 6, 0, 0);
const MIN = 60_000;
const HOUR = 3_600_000;
const at = (m: number) => t0 + m * MIN;
const fetida = speciesProfiles["eisenia-fetida"];
const zone = { id: "zone-1", kind: "fresh", binName: "Long Bed North" } as const;

/** One reading a minute from minute `from`; values[k] is the reading at minute from + k. */
const minuteSeries = (values: readonly number[], from = 0) => values.map((v, k) => ({ t: at(from + k), v }));
/** `n` readings of the same value. */
const hold = (v: number, n: number) => Array.from({ length: n }, () => v);
const probe = (id: number) => ({ id, code: `p-${id}`, reportIntervalS: 60, lastSeenAt: null, metrics: ["temperature"] });

type Opts = { feedings?: FeedingContext[]; overrides?: RuleOverrides; readings?: ProbeSeries[]; probes?: number[]; unitSystem?: "metric" | "imperial" };

/** Replays minute by minute over the readings and returns every non-update transition with its minute. */
function run(values: readonly number[], opts: Opts = {}) {
  const readings = opts.readings ?? [{ probeId: 7, metric: "temperature" as const, points: minuteSeries(values) }];
  const last = Math.max(...readings.flatMap((r) => r.points.map((p) => p.t)));
  const minutes = Array.from({ length: Math.round((last - t0) / MIN) + 1 }, (_, m) => at(m));
  const steps = replay(
    {
      zone,
      species: fetida,
      overrides: opts.overrides,
      readings,
      recentFeedings: opts.feedings ?? [],
      probes: (opts.probes ?? [7]).map(probe),
      kinds: ["heat", "chill"],
      unitSystem: opts.unitSystem,
    },
    minutes,
  );
  const events = steps.flatMap((s) => s.transitions.filter((t) => t.type !== "update").map((t) => ({ minute: (s.at - t0) / MIN, ...t })));
  return { steps, events, brief: events.map((e) => `${e.minute} ${e.type} ${e.kind} ${e.level}`) };
}

describe("heat by the species band (E. fetida: comfortable to 25 °C, warm stress 30 °C)", () => {
  it("raises a heads-up after 10 min above 25 °C and settles after 15 min at or below 24.5 °C", () => {
    // 24 °C to minute 29, 26 °C from 30 to 79, 24.7 °C (inside the deadband) 80–99, 24.5 °C from 100
    const values = [...hold(24, 30), ...hold(26, 50), ...hold(24.7, 20), ...hold(24.5, 30)];
    const { events, brief } = run(values);
    expect(brief).toEqual(["40 raise heat heads_up", "115 settle heat heads_up"]);
    expect(events[0]!.value).toBe(26);
    expect(events[0]!.subject).toBe("zone:zone-1:heat");
    expect(events[0]!.probeId).toBe(7);
    expect(events[0]!.message).toBe("Long Bed North, fresh zone: 26.0 °C, above the comfortable 15.0–25.0 °C for red wigglers.");
    expect(events[1]!.message).toBe("Long Bed North, fresh zone: cooled to 24.5 °C, inside the band for 15 min.");
  });

  it("does not raise when the heat lasts one minute less than the duration", () => {
    // 26 °C at minutes 30..39: the run spans 9 minutes
    const values = [...hold(24, 30), ...hold(26, 10), ...hold(24, 30)];
    expect(run(values).brief).toEqual([]);
    // one reading more and it does
    expect(run([...hold(24, 30), ...hold(26, 11), ...hold(24, 30)]).brief[0]).toBe("40 raise heat heads_up");
  });

  it("exactly 25.0 °C is still comfortable; act now starts at exactly 30.0 °C", () => {
    expect(run([...hold(25, 40)]).brief).toEqual([]);
    const { brief, events } = run([...hold(24, 10), ...hold(30, 30)]);
    // both triggers start at minute 10; act now wins at once, so the raise is already act now
    expect(brief).toEqual(["20 raise heat act_now"]);
    expect(events[0]!.message).toContain("at or above 30.0 °C where red wigglers suffer");
  });

  it("escalates a heads-up to act now after 10 min at warm stress, and keeps act now until it settles", () => {
    // 26 from 0, 31 from 30, back to 27 (above the band, below warm stress) from 60, 24 from 90
    const values = [...hold(26, 30), ...hold(31, 30), ...hold(27, 30), ...hold(24, 20)];
    const { brief } = run(values);
    expect(brief).toEqual(["10 raise heat heads_up", "40 escalate heat act_now", "105 settle heat act_now"]);
  });

  it("a dip into the deadband restarts the settle clock", () => {
    // hot, then 24 for 10 min, one reading of 24.8 (deadband), then 24 again
    const values = [...hold(26, 20), ...hold(24, 10), 24.8, ...hold(24, 20)];
    const { brief } = run(values);
    // raise at 10; cool from 20, broken at 30; cool again from 31 → settles at 46
    expect(brief).toEqual(["10 raise heat heads_up", "46 settle heat heads_up"]);
  });

  it("a gap longer than the silence line breaks the run", () => {
    const points = [...minuteSeries(hold(26, 6), 30), ...minuteSeries(hold(26, 30), 51)];
    const { brief } = run([], { readings: [{ probeId: 7, metric: "temperature", points }] });
    // 30..35, then nothing for 16 minutes (silence line: 10 min), then 51.. → 10 min from 51
    expect(brief).toEqual(["61 raise heat heads_up"]);
  });

  it("a probe whose readings are stale takes no part", () => {
    const hot = minuteSeries(hold(27, 20));
    const base = { zone, species: fetida, recentFeedings: [], probes: [probe(7)], openAlerts: [], kinds: ["heat"] as const };
    expect(evaluateZone({ ...base, now: at(19), readings: [{ probeId: 7, metric: "temperature", points: hot }] })).toHaveLength(1);
    // the same readings judged 10 minutes after the last one: the probe is silent, not hot
    expect(evaluateZone({ ...base, now: at(29), readings: [{ probeId: 7, metric: "temperature", points: hot }] })).toEqual([]);
  });

  it("with two probes the hotter one speaks, and the zone settles only when both have cooled", () => {
    const cool = minuteSeries(hold(22, 80));
    const hot = minuteSeries([...hold(27, 40), ...hold(24, 40)]);
    const { events, brief } = run([], {
      probes: [7, 8],
      readings: [
        { probeId: 7, metric: "temperature", points: cool },
        { probeId: 8, metric: "temperature", points: hot },
      ],
    });
    expect(brief).toEqual(["10 raise heat heads_up", "55 settle heat heads_up"]);
    expect(events[0]).toMatchObject({ probeId: 8, value: 27 });
  });

  it("an error code stored as a reading is not heat", () => {
    // 85 °C is the power-on value of a DS18B20-style probe (lib/domain/metrics.ts); probe_fault handles it
    expect(run([...hold(22, 5), ...hold(85, 30)]).brief).toEqual([]);
  });

  it("speaks the farm's units", () => {
    const { events } = run([...hold(24, 30), ...hold(26, 20)], { unitSystem: "imperial" });
    expect(events[0]!.message).toBe("Long Bed North, fresh zone: 78.8 °F, above the comfortable 59.0–77.0 °F for red wigglers.");
  });

  it("an owner's override moves the line and the duration", () => {
    const values = [...hold(24, 30), ...hold(26, 50)];
    expect(run(values, { overrides: { heat: { thresholds: { headsUpAboveC: 26.5 } } } }).brief).toEqual([]);
    expect(run(values, { overrides: { heat: { thresholds: { raiseMinutes: 3 } } } }).brief).toEqual(["33 raise heat heads_up"]);
    expect(run(values, { overrides: { heat: { enabled: false } } }).brief).toEqual([]);
  });

  it("rules the caller already resolved are the ones applied, not resolved again from overrides", () => {
    // The rule runner resolves once to size its lookback and hands the result on.
    const hot = { probeId: 7, metric: "temperature" as const, points: minuteSeries([...hold(24, 30), ...hold(26, 50)]) };
    const input = { now: at(79), zone, species: fetida, readings: [hot], recentFeedings: [], probes: [probe(7)], openAlerts: [], kinds: ["heat" as const] };
    expect(evaluateZone(input).map((t) => `${t.type} ${t.kind}`)).toEqual(["raise heat"]);
    const quiet = resolveRules(fetida, { heat: { thresholds: { headsUpAboveC: 26.5 } } });
    expect(evaluateZone({ ...input, rules: quiet })).toEqual([]);
    // Given both, the resolved rules win: overrides are not read a second time.
    expect(evaluateZone({ ...input, rules: quiet, overrides: { heat: { thresholds: { headsUpAboveC: 20 } } } })).toEqual([]);
  });

  it("a kind turned off settles its open alert", () => {
    const open: OpenAlert[] = [{ subject: "zone:zone-1:heat", kind: "heat", level: "heads_up", state: "claimed", raisedAt: at(0) }];
    const out = evaluateZone({
      now: at(20),
      zone,
      species: fetida,
      overrides: { heat: { enabled: false } },
      readings: [{ probeId: 7, metric: "temperature", points: minuteSeries(hold(27, 21)) }],
      recentFeedings: [],
      probes: [probe(7)],
      openAlerts: open,
      kinds: ["heat"],
    });
    expect(out).toEqual([expect.objectContaining({ type: "settle", kind: "heat", level: "heads_up", details: { reason: "rule-off" } })]);
  });
});

describe("heat by rate of rise after a feeding", () => {
  // 20 °C rising 2 °C/h from minute 0: the least-squares rate over the last 60 min is 2 °C/h from
  // minute 60, when the readings first cover the window.
  const rising = Array.from({ length: 320 }, (_, m) => 20 + (2 * m) / 60);
  const feedingHere = (minute: number): FeedingContext => ({ at: at(minute), zoneId: "zone-1", totalKg: 12, mixCn: 22, mixMoisturePct: 80 });

  it("raises a heads-up inside the band once the hour's rise passes 1 °C/h, then act now at 30 °C", () => {
    const { events, brief } = run(rising, { feedings: [feedingHere(0)] });
    expect(brief).toEqual(["60 raise heat heads_up", "310 escalate heat act_now"]);
    expect(events[0]!.value).toBeCloseTo(22, 9);
    expect(events[0]!.details).toMatchObject({ trigger: "fast-rise", feedingAt: at(0) });
    expect(events[0]!.message).toBe(
      "Long Bed North, fresh zone: 22.0 °C and rising 2.0 °C/h since the 12.0 kg feeding at 06:00. Still inside 15.0–25.0 °C, but heating fast.",
    );
    expect(events[1]!.message).toBe(
      "Long Bed North, fresh zone: 30.3 °C and rising 2.0 °C/h, at or above 30.0 °C where red wigglers suffer. Cool the bed now.",
    );
  });

  it("names the feeding's mass in the farm's units: 12 kg is 26.5 lb on an imperial farm", () => {
    const { events } = run(rising, { feedings: [feedingHere(0)], unitSystem: "imperial" });
    expect(events[0]!.message).toBe(
      "Long Bed North, fresh zone: 71.6 °F and rising 3.6 °F/h since the 26.5 lb feeding at 06:00. Still inside 59.0–77.0 °F, but heating fast.",
    );
    expect(events[0]!.message).not.toMatch(/kg|°C/);
  });

  it("an open alert worded in °C and kg is worded again in °F and lb at the next evaluation after the farm switches units", () => {
    const metric = run(rising.slice(0, 61), { feedings: [feedingHere(0)] });
    const raised = metric.events[0]!;
    const open: OpenAlert[] = [
      {
        subject: raised.subject,
        kind: "heat",
        level: "heads_up",
        state: "raised",
        raisedAt: at(60),
        details: raised.details,
        value: raised.value,
        message: raised.message,
      },
    ];
    const out = evaluateZone({
      now: at(61),
      zone,
      species: fetida,
      readings: [{ probeId: 7, metric: "temperature", points: minuteSeries(rising.slice(0, 62)) }],
      recentFeedings: [feedingHere(0)],
      probes: [probe(7)],
      openAlerts: open,
      kinds: ["heat"],
      unitSystem: "imperial",
    });
    expect(out).toEqual([expect.objectContaining({ type: "update", subject: raised.subject })]);
    expect(out[0]!.message).toMatch(/°F and rising 3\.6 °F\/h since the 26\.5 lb feeding/);
  });

  it("an open alert keeps the words it was raised with; updates carry the latest value and time (issue 11)", () => {
    const { steps, events } = run(rising.slice(0, 200), { feedings: [feedingHere(0)] });
    const raised = events[0]!;
    const updates = steps.flatMap((s) => s.transitions).filter((t) => t.type === "update");
    expect(updates.length).toBeGreaterThan(100);
    for (const u of updates) expect(u.message).toBe(raised.message);
    const last = updates[updates.length - 1]!;
    expect(last.details).toMatchObject({ latestValue: last.value, latestAt: at(199) });
    expect(last.value).toBeCloseTo(20 + (2 * 199) / 60, 9);
    // the words never claim "near the top" of the band while the bed sits mid-band
    expect(steps.flatMap((s) => s.transitions).some((t) => /near the top/.test(t.message))).toBe(false);
  });

  it("a rise is judged against the same hour on the previous days: the usual morning warm-up is no alarm after a heavy feed", () => {
    // three days warming 1.2 °C/h from 06:00 to 11:00 and cooling back; on day 4 the same warm-up after a heavy feed
    const day = (m: number) => {
      const h = (m % 1440) / 60;
      return 18 + (h >= 6 && h < 11 ? 1.2 * (h - 6) : h >= 11 && h < 23 ? 6 - 0.5 * (h - 11) : 0);
    };
    const start = -3 * 1440;
    const values = Array.from({ length: 3 * 1440 + 11 * 60 }, (_, k) => day(k));
    const readings: ProbeSeries[] = [{ probeId: 7, metric: "temperature", points: minuteSeries(values, start) }];
    const feed = { at: at(5 * 60), zoneId: "zone-1", totalKg: 12 };
    const morning = Array.from({ length: 6 * 60 }, (_, m) => at(5 * 60 + m));
    const rhythm = replay({ zone, species: fetida, readings, recentFeedings: [feed], probes: [probe(7)], kinds: ["heat"] }, morning);
    expect(rhythm.flatMap((s) => s.transitions)).toEqual([]);
    // the same morning with no days behind it is judged against 0 °C/h, and 1.2 °C/h raises
    const alone = replay(
      {
        zone,
        species: fetida,
        readings: [{ probeId: 7, metric: "temperature", points: minuteSeries(values.slice(3 * 1440 - 60), -60) }],
        recentFeedings: [feed],
        probes: [probe(7)],
        kinds: ["heat"],
      },
      morning,
    );
    expect(alone.flatMap((s) => s.transitions).map((t) => `${t.type} ${t.kind}`)[0]).toBe("raise heat");
  });

  it("watches a feeding at the heavy line for 48 h and no longer (issue 11: the watch follows the feeding)", () => {
    // a feeding of unknown mass counts as exactly heavy: fed 47 h before minute 0, 48 h old at minute 60
    expect(run(rising, { feedings: [{ at: at(-47 * 60), zoneId: "zone-1" }] }).brief[0]).toBe("60 raise heat heads_up");
    // one minute older: no rise alert; the band alert comes at 25 °C + 10 min (first reading above 25 °C is minute 151)
    expect(run(rising, { feedings: [{ at: at(-47 * 60 - 1), zoneId: "zone-1" }] }).brief[0]).toBe("161 raise heat heads_up");
    expect(run(rising).brief[0]).toBe("161 raise heat heads_up");
    // twice the heavy line (4 kg in a bin with no size, heavy from 2 kg, common practice): watched 96 h
    expect(run(rising, { feedings: [{ at: at(-95 * 60), zoneId: "zone-1", totalKg: 4 }] }).brief[0]).toBe("60 raise heat heads_up");
    expect(run(rising, { feedings: [{ at: at(-95 * 60 - 1), zoneId: "zone-1", totalKg: 4 }] }).brief[0]).toBe("161 raise heat heads_up");
  });

  it("a light feeding arms nothing: 0.2 kg on a 1 m² bed is under 4 kg/m² (common practice)", () => {
    const light = { at: at(0), zoneId: null, totalKg: 0.2 };
    const steps = replay(
      {
        zone,
        species: fetida,
        bed: { lengthCm: 100, widthCm: 100, zoneCount: 1 },
        readings: [{ probeId: 7, metric: "temperature", points: minuteSeries(rising.slice(0, 140)) }],
        recentFeedings: [light],
        probes: [probe(7)],
        kinds: ["heat"],
      },
      Array.from({ length: 140 }, (_, m) => at(m)),
    );
    expect(steps.flatMap((s) => s.transitions)).toEqual([]);
    // the same 0.2 kg fed to one zone of a 0.2 m × 0.2 m tote is 5 kg/m²: heavy
    const heavy = replay(
      {
        zone,
        species: fetida,
        bed: { lengthCm: 20, widthCm: 20, zoneCount: 1 },
        readings: [{ probeId: 7, metric: "temperature", points: minuteSeries(rising.slice(0, 70)) }],
        recentFeedings: [light],
        probes: [probe(7)],
        kinds: ["heat"],
      },
      [at(60)],
    );
    expect(heavy[0]!.transitions).toEqual([
      expect.objectContaining({ type: "raise", details: expect.objectContaining({ trigger: "fast-rise", feedingKgPerM2: 5 }) }),
    ]);
  });

  it("counts a feeding of the whole bin, not one of another zone", () => {
    expect(run(rising, { feedings: [{ at: at(0), zoneId: null }] }).brief[0]).toBe("60 raise heat heads_up");
    expect(run(rising, { feedings: [{ at: at(0), zoneId: "zone-2" }] }).brief[0]).toBe("161 raise heat heads_up");
  });

  it("ignores a slow rise and a short burst", () => {
    const slow = Array.from({ length: 200 }, (_, m) => 20 + (0.9 * m) / 60);
    expect(run(slow, { feedings: [feedingHere(0)] }).brief).toEqual([]);
    // flat for two hours with one 10-minute burst of +1.5 °C in the middle
    const burst = [...hold(21, 60), ...Array.from({ length: 10 }, (_, k) => 21 + 0.15 * (k + 1)), ...hold(21, 60)];
    expect(run(burst, { feedings: [feedingHere(0)] }).brief).toEqual([]);
  });

  it("settles 15 min after the hour's rate falls below 0.5 °C/h, and not while it sits between 0.5 and 1 °C/h", () => {
    // 2 °C/h for an hour, then 0.8 °C/h (inside the rate deadband) for 150 min, then flat
    const values: number[] = [];
    for (let m = 0; m <= 60; m++) values.push(20 + (2 * m) / 60);
    for (let m = 1; m <= 150; m++) values.push(22 + (0.8 * m) / 60);
    for (let m = 1; m <= 120; m++) values.push(24);
    const { brief } = run(values, { feedings: [feedingHere(0)] });
    // first minute whose 60-min least-squares rate (lib/domain/trend, tested on its own) is below 0.5 °C/h
    const points = minuteSeries(values);
    const calm = points.findIndex((p, m) => m > 60 && ratePerHour(points.slice(0, m + 1), { windowMs: HOUR })! < 0.5);
    expect(calm).toBeGreaterThan(210);
    expect(brief).toEqual(["60 raise heat heads_up", `${calm + 15} settle heat heads_up`]);
  });
});

describe("chill (E. fetida: comfortable from 15 °C, survives 0 °C)", () => {
  it("raises after 10 min below 15 °C, escalates below 10 °C, settles after 15 min at or above 15.5 °C", () => {
    // issue 11: act now only near the lethal line; NC State Extension: red wigglers survive 0 °C (2 °C margin, common practice)
    const values = [...hold(16, 20), ...hold(14, 20), ...hold(1.5, 20), ...hold(15.4, 20), ...hold(15.5, 20)];
    const { brief, events } = run(values);
    expect(brief).toEqual(["30 raise chill heads_up", "50 escalate chill act_now", "95 settle chill act_now"]);
    expect(events[0]!.message).toBe("Long Bed North, fresh zone: 14.0 °C, below the comfortable 15.0–25.0 °C for red wigglers.");
    expect(events[1]!.message).toContain("1.5 °C");
    expect(events[1]!.message).toContain("below 2.0 °C, close to the cold that kills red wigglers. Warm the bed now.");
    // a cold room at 5 °C stays a heads-up
    expect(run([...hold(16, 20), ...hold(5, 60)]).brief).toEqual(["30 raise chill heads_up"]);
  });

  it("uses the species: 14 °C is a heads-up for E. fetida and 19 °C for E. eugeniae", () => {
    const eugeniae = speciesProfiles["eudrilus-eugeniae"];
    const out = (species: typeof fetida, v: number): Transition[] =>
      evaluateZone({
        now: at(20),
        zone,
        species,
        readings: [{ probeId: 7, metric: "temperature", points: minuteSeries(hold(v, 21)) }],
        recentFeedings: [],
        probes: [probe(7)],
        openAlerts: [],
        kinds: ["chill"],
      });
    expect(out(fetida, 19)).toEqual([]);
    expect(out(eugeniae, 19)).toEqual([expect.objectContaining({ type: "raise", level: "heads_up" })]);
    // E. eugeniae: dies below 9 °C (Domínguez & Edwards 2011, citing Viljoen & Reinecke): act now below 11 °C
    expect(out(eugeniae, 14)).toEqual([expect.objectContaining({ type: "raise", level: "heads_up" })]);
    expect(out(eugeniae, 10.5)).toEqual([expect.objectContaining({ type: "raise", level: "act_now" })]);
  });
});
