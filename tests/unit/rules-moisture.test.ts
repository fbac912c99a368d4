import { describe, expect, it } from "vitest";
import { replay, type ProbeSeries, type RuleOverrides } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";
import { predictCrossing } from "@/lib/domain/trend";

const t0 = Date.UTC(2025, 5, 1, 6, 0, 0);
const MIN = 60_000;
const HOUR = 3_600_000;
const at = (m: number) => t0 + m * MIN;
const fetida = speciesProfiles["eisenia-fetida"];
const zone = { id: "zone-3", kind: "curing", binName: "Tote 2" } as const;

const minuteSeries = (values: readonly number[]) => values.map((v, m) => ({ t: at(m), v }));
const hold = (v: number, n: number) => Array.from({ length: n }, () => v);

type Opts = { overrides?: RuleOverrides; timeZone?: string; from?: number };

function run(values: readonly number[], opts: Opts = {}) {
  const readings: ProbeSeries[] = [{ probeId: 3, metric: "moisture", points: minuteSeries(values) }];
  const minutes = Array.from({ length: values.length - (opts.from ?? 0) }, (_, k) => at(k + (opts.from ?? 0)));
  const steps = replay(
    {
      zone,
      species: fetida,
      overrides: opts.overrides,
      readings,
      recentFeedings: [],
      probes: [{ id: 3, code: "p-3", reportIntervalS: 60, lastSeenAt: null, metrics: ["moisture"] }],
      kinds: ["drying", "soggy"],
      timeZone: opts.timeZone,
    },
    minutes,
  );
  const events = steps.flatMap((s) => s.transitions.filter((t) => t.type !== "update").map((t) => ({ minute: (s.at - t0) / MIN, ...t })));
  return { events, brief: events.map((e) => `${e.minute} ${e.type} ${e.kind} ${e.level}`) };
}

describe("drying (E. fetida: comfortable from 70 %, Kaplan et al. 1980)", () => {
  it("raises after 10 min below 70 %, escalates below 60 %, settles after 15 min at or above 72 %", () => {
    // act now below 60 %: half-way from the band (70 %) to the survival limit (50 %) — common practice
    const values = [...hold(72, 20), ...hold(69, 20), ...hold(59, 20), ...hold(71.9, 20), ...hold(72, 20)];
    const { brief, events } = run(values);
    expect(brief).toEqual(["30 raise drying heads_up", "50 escalate drying act_now", "95 settle drying act_now"]);
    expect(events[0]!.message).toBe("Tote 2, curing zone: moisture 69.0 %, below the comfortable 70.0–90.0 % for red wigglers.");
    expect(events[1]!.message).toBe("Tote 2, curing zone: moisture 59.0 %, far below the comfortable 70.0–90.0 %. Water the bed now.");
    expect(events[2]!.message).toBe("Tote 2, curing zone: moisture back to 72.0 %, inside the band for 15 min.");
  });

  it("predicts the crossing of a straight drying series exactly and raises 12 h ahead of it", () => {
    // 80 % falling 0.45 points/h crosses 70 % at 10/0.45 h = 22 h 13 min 20 s; 12 h before that is
    // minute 613.3, so the first reading that sees the crossing within 12 h is minute 614.
    const values = Array.from({ length: 700 }, (_, m) => 80 - (0.45 * m) / 60);
    const { events, brief } = run(values, { from: 590 });
    expect(brief).toEqual(["614 raise drying heads_up"]);
    const crossing = t0 + (10 / 0.45) * HOUR;
    const predicted = events[0]!.details.predictedAt as number;
    expect(Math.abs(predicted - crossing)).toBeLessThan(1);
    expect(events[0]!.details.predictedAtIso).toBe(new Date(predicted).toISOString());
    expect(events[0]!.details.ratePerHour).toBeCloseTo(-0.45, 9);
    expect(events[0]!.message).toBe(
      "Tote 2, curing zone: moisture 75.4 % and falling 0.45 points/h; at this rate it drops below 70.0 % in about 11 h 59 min (around 04:13).",
    );
  });

  it("prints the predicted time on the farm's clock", () => {
    const values = Array.from({ length: 700 }, (_, m) => 80 - (0.45 * m) / 60);
    // Berlin is UTC+2 in June
    expect(run(values, { from: 610, timeZone: "Europe/Berlin" }).events[0]!.message).toContain("(around 06:13)");
  });

  it("needs 6 h of readings before trusting a trend", () => {
    // falling 2 points/h from 80 %: 70 % at minute 300, so the first reading below it is minute 301
    // and the threshold raises 10 min later; the trend, needing 6 h of readings, never got a say
    const values = Array.from({ length: 361 }, (_, m) => 80 - (2 * m) / 60);
    expect(run(values, { from: 200 }).brief).toEqual(["311 raise drying heads_up"]);
    // with a 4 h minimum the trend speaks first, at minute 240
    expect(run(values, { from: 200, overrides: { drying: { thresholds: { trendMinSpanHours: 4 } } } }).brief[0]).toBe("240 raise drying heads_up");
  });

  it("a trend alert settles only once the crossing is more than 18 h off, held 15 min", () => {
    // a day of drying, then watered back to 78 % and flat: the day's line flattens slowly
    const values = [...Array.from({ length: 660 }, (_, m) => 80 - (0.45 * m) / 60), ...hold(78, 900)];
    const { brief } = run(values, { from: 600 });
    // the first minute from which (by lib/domain/trend, tested on its own) the crossing has been more than
    // 18 h off (or gone) for 15 minutes
    const points = minuteSeries(values);
    const far = (m: number) => {
      const c = predictCrossing(points.slice(0, m + 1), 70, { windowMs: 24 * HOUR, now: at(m) });
      return c === null || c - at(m) > 18 * HOUR;
    };
    let settle = -1;
    for (let m = 675; m < values.length && settle < 0; m++) {
      if (Array.from({ length: 16 }, (_, k) => m - k).every((x) => values[x]! >= 72 && far(x))) settle = m;
    }
    expect(settle).toBeGreaterThan(700);
    expect(brief).toEqual(["614 raise drying heads_up", `${settle} settle drying heads_up`]);
  });
});

// Issue 11: the old band (to 85 %, act now above 87.5 %) fired inside the published optimum.
describe("soggy (E. fetida: comfortable to 90 %, Domínguez & Edwards 2011; Loehr et al. 1985 best at 84–91 %)", () => {
  it("raises after 10 min above 90 %, escalates above 93 %, settles after 15 min at or below 88 %", () => {
    const values = [...hold(89, 10), ...hold(91, 20), ...hold(93.5, 20), ...hold(88.1, 20), ...hold(88, 20)];
    const { brief, events } = run(values);
    expect(brief).toEqual(["20 raise soggy heads_up", "40 escalate soggy act_now", "85 settle soggy act_now"]);
    expect(events[0]!.subject).toBe("zone:zone-3:soggy");
    expect(events[1]!.message).toBe("Tote 2, curing zone: moisture 93.5 %, far above the comfortable 70.0–90.0 %. Mix in dry bedding now.");
  });

  it("never calls a bed inside the published optimum soggy: 85–90 % raises nothing (van Gestel et al. 1992: most cocoons at 85 %)", () => {
    expect(run([...hold(85, 60), ...hold(88, 60), ...hold(90, 60)]).brief).toEqual([]);
  });

  it("uses the species band: 83 % is soggy for E. eugeniae (comfortable to 82 %, Viljoen & Reinecke)", () => {
    const values = hold(83, 30);
    expect(run(values).brief).toEqual([]);
    const steps = replay(
      {
        zone,
        species: speciesProfiles["eudrilus-eugeniae"],
        readings: [{ probeId: 3, metric: "moisture", points: minuteSeries(values) }],
        recentFeedings: [],
        probes: [{ id: 3, code: "p-3", reportIntervalS: 60, lastSeenAt: null, metrics: ["moisture"] }],
        kinds: ["soggy"],
      },
      [at(10)],
    );
    expect(steps[0]!.transitions).toEqual([expect.objectContaining({ type: "raise", level: "heads_up", value: 83 })]);
  });
});
