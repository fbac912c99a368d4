// The scenario library (issue 11 item 11): realistic, generated series replayed through the same
// rules the runner uses. Each scenario names the alerts it must raise (kind, level, within how many
// minutes of the cause) and raises nothing else; the source of each expectation is named beside it.
// The table of scenarios, delays and alert counts is printed and written to .data/scenarios.md.
import { afterAll, describe, expect, it } from "vitest";
import type { BedContext, FeedingContext, ProbeSeries } from "@/lib/domain/rules";
import { speciesProfiles, type SpeciesProfile } from "@/lib/domain/species";
import { DAY, HOUR, MIN, T0, firstWhen, probe, sample, score, seeded, table, writeTable, type Scenario, type Score } from "./kit";

const fetida = speciesProfiles["eisenia-fetida"];
const zone = { id: "zone-s", kind: "fresh", binName: "Scenario bin" } as const;
/** An outdoor bin of 1.2 m × 0.6 m: 0.72 m² of bed. */
const outdoorBed: BedContext = { lengthCm: 120, widthCm: 60, zoneCount: 1 };
const squareMetre: BedContext = { lengthCm: 100, widthCm: 100, zoneCount: 1 };
const TEMP_STEP = 0.0625; // a 12-bit digital probe's step
const TAU = 2 * Math.PI;

/** An outdoor bed: 20 °C ± 4 °C a day, warmest at 15:00, rising fastest (1.05 °C/h) at 09:00. */
const swing = (t: number) => 20 + 4 * Math.sin((TAU * (t - T0 - 9 * HOUR)) / DAY);
const every = (ms: number, from: number, to: number) => Array.from({ length: Math.floor((to - from) / ms) }, (_, k) => from + k * ms);
const times = (series: readonly ProbeSeries[]) => [...new Set(series.flatMap((s) => s.points.map((p) => p.t)))].sort((a, b) => a - b);

function bed(
  name: string,
  why: string,
  o: {
    species?: SpeciesProfile;
    reportIntervalS: number;
    readings: ProbeSeries[];
    feedings?: FeedingContext[];
    bed?: BedContext;
    times?: number[];
  },
): Omit<Scenario, "expect"> {
  const metrics = [...new Set(o.readings.map((r) => r.metric))];
  return {
    name,
    why,
    input: {
      zone,
      species: o.species ?? fetida,
      bed: o.bed,
      readings: o.readings,
      recentFeedings: o.feedings ?? [],
      probes: [probe(1, o.reportIntervalS, metrics)],
    },
    times: o.times ?? times(o.readings),
  };
}

const temperature = (points: { t: number; v: number }[]): ProbeSeries => ({ probeId: 1, metric: "temperature", points });
const moisture = (points: { t: number; v: number }[]): ProbeSeries => ({ probeId: 1, metric: "moisture", points });

// 1. Steady bed: 20 °C and 80 % with a probe's noise, one report a minute for 36 h.
function steadyBed(): Scenario {
  const r = seeded(1);
  const to = T0 + 36 * HOUR;
  return {
    ...bed("steady bed", "inside every band (NC State Extension 15–25 °C; 70–90 % moisture): nothing to say", {
      reportIntervalS: 60,
      readings: [
        temperature(sample(() => 20 + r.noise(0.08), { to, everyMs: MIN, step: TEMP_STEP })),
        moisture(sample(() => 80 + r.noise(0.2), { to, everyMs: MIN, step: 0.1 })),
      ],
    }),
    expect: [],
  };
}

// 2. Outdoor bin swinging ±4 °C a day for 14 days, with heavy feedings of cool, bedding-rich food
// that do not heat: every morning's 1.05 °C/h warm-up happens inside a post-feed watch.
function outdoorSwing(): Scenario {
  const r = seeded(2);
  const to = T0 + 14 * DAY;
  const feedings = [4, 8, 12].map((d) => ({ at: T0 + d * DAY + 8 * HOUR, zoneId: null, totalKg: 3.5 }));
  return {
    ...bed("outdoor bin, ±4 °C a day, 14 days", "a normal morning warm-up is the zone's own rhythm, not heat (common practice)", {
      reportIntervalS: 300,
      bed: outdoorBed,
      feedings,
      readings: [
        temperature(sample((t) => swing(t) + r.noise(0.05), { to, everyMs: 5 * MIN, step: TEMP_STEP })),
        moisture(sample(() => 78 + r.noise(0.2), { to, everyMs: 5 * MIN, step: 0.1 })),
      ],
    }),
    expect: [],
  };
}

// 3. The same bin on day 10: 5 kg (6.9 kg/m²) of fresh food at 08:00 starts self-heating an hour later
// at 1.5 °C/h on top of the morning warm-up, for 6 h, then cools off over the night.
function heavyFeedOutdoors(): Scenario {
  const r = seeded(3);
  const to = T0 + 12 * DAY;
  const fedAt = T0 + 10 * DAY + 8 * HOUR;
  const heatFrom = fedAt + HOUR;
  const extra = (t: number) =>
    t < heatFrom ? 0 : t < heatFrom + 6 * HOUR ? (1.5 * (t - heatFrom)) / HOUR : 9 * Math.exp(-(t - heatFrom - 6 * HOUR) / (8 * HOUR));
  const temps = sample((t) => swing(t) + extra(t) + r.noise(0.05), { to, everyMs: 5 * MIN, step: TEMP_STEP });
  return {
    ...bed("heavy feed in the outdoor bin", "fresh food self-heats and can kill the worms (Wikipedia, Vermicompost, Climate and temperature)", {
      reportIntervalS: 300,
      bed: outdoorBed,
      feedings: [{ at: fedAt, zoneId: null, totalKg: 5 }],
      readings: [temperature(temps), moisture(sample(() => 78 + r.noise(0.2), { to, everyMs: 5 * MIN, step: 0.1 }))],
    }),
    expect: [
      // 1 °C/h faster than the zone's usual at that hour: common practice
      { kind: "heat", level: "heads_up", causeAt: heatFrom, withinMin: 60, source: "common practice" },
      // Loehr et al. 1985: growth reduced at 30 °C; held 10 min (common practice) at 5-min reports
      { kind: "heat", level: "act_now", causeAt: firstWhen(temps, (v) => v >= 30), withinMin: 15, source: "Loehr et al. 1985" },
    ],
  };
}

// 4. Light feed: 0.2 kg on a 1 m² bed, then the room warms the bed 1.3 °C/h for two hours, inside the band.
function lightFeed(): Scenario {
  const r = seeded(4);
  const to = T0 + 24 * HOUR;
  const fedAt = T0 + 12 * HOUR;
  const warm = (t: number) => Math.min(2.6, Math.max(0, (1.3 * (t - fedAt)) / HOUR));
  return {
    ...bed("light feed", "0.2 kg/m² is far under the heavy line of 4 kg/m² (common practice): no post-feed watch", {
      reportIntervalS: 60,
      bed: squareMetre,
      feedings: [{ at: fedAt, zoneId: null, totalKg: 0.2, mixCn: 30, mixMoisturePct: 80 }],
      readings: [temperature(sample((t) => 20 + warm(t) + r.noise(0.05), { to, everyMs: MIN, step: TEMP_STEP }))],
    }),
    expect: [],
  };
}

// 5. A probe reporting once an hour in a bed heating 2.5 °C/h from 06:10.
function hourlyProbe(): Scenario {
  const r = seeded(5);
  const from = T0 + 6 * HOUR + 10 * MIN;
  const temp = (t: number) => Math.min(34, 20 + Math.max(0, (2.5 * (t - from)) / HOUR));
  const to = T0 + 14 * HOUR;
  return {
    ...bed("hourly probe, 2.5 °C/h rise", "each line is seen at the first hourly report past it, not an hour later", {
      reportIntervalS: 3600,
      readings: [temperature(sample((t) => temp(t) + r.noise(0.03), { to, everyMs: HOUR, step: TEMP_STEP }))],
      times: every(5 * MIN, T0, to),
    }),
    expect: [
      // NC State Extension: ideal to 25 °C; crossed 2 h into the rise
      { kind: "heat", level: "heads_up", causeAt: from + 2 * HOUR, withinMin: 60, source: "NC State Extension" },
      // Loehr et al. 1985: growth reduced at 30 °C; crossed 4 h into the rise
      { kind: "heat", level: "act_now", causeAt: from + 4 * HOUR, withinMin: 60, source: "Loehr et al. 1985" },
    ],
  };
}

// 6. Irregular arrivals: a probe set to report every minute whose messages arrive 20 s to 4 min
// apart; steady for 6 h, then a heater fault warms the bed 1 °C/h past 25 °C.
function irregularArrivals(): Scenario {
  const r = seeded(6);
  const to = T0 + 12 * HOUR;
  const arrivals: number[] = [];
  for (let t = T0; t < to; t += Math.round(20_000 + r.next() * 220_000)) arrivals.push(t);
  const temp = (t: number) => 21 + Math.max(0, (t - T0 - 6 * HOUR) / HOUR);
  const points = arrivals.map((t) => ({ t, v: Math.round((temp(t) + r.noise(0.05)) / TEMP_STEP) * TEMP_STEP }));
  return {
    ...bed("irregular arrivals (20 s – 4 min)", "gaps under the silent line are no silence; the heat line still holds 10 min", {
      reportIntervalS: 60,
      readings: [temperature(points)],
    }),
    expect: [
      // NC State Extension: ideal to 25 °C, crossed at 10:00. Allowed: the 10-min hold (common practice), up to 4 min
      // between arrivals, and the minutes a 1 °C/h rise takes to clear the probe's noise (±0.1 °C: 6 min) and 1/16 °C step.
      { kind: "heat", level: "heads_up", causeAt: T0 + 10 * HOUR, withinMin: 25, source: "NC State Extension" },
    ],
  };
}

// 7. A 5-min probe that drops a few reports: a 16-min gap every 45 min for 6 h, then 3 h on time.
function probeWithGaps(): Scenario {
  const r = seeded(7);
  const to = T0 + 9 * HOUR;
  const arrivals: number[] = [];
  let nextGap = T0 + HOUR;
  for (let t = T0; t < to;) {
    arrivals.push(t);
    if (t >= nextGap && t < T0 + 7 * HOUR) {
      t += 16 * MIN;
      nextGap = t + 45 * MIN;
    } else t += 5 * MIN;
  }
  const points = arrivals.map((t) => ({ t, v: Math.round((21 + r.noise(0.05)) / TEMP_STEP) * TEMP_STEP }));
  const firstGap = arrivals.find((t, k) => (arrivals[k + 1] ?? t) - t > 15 * MIN)!;
  return {
    ...bed("probe with gaps (5 min, 16-min gaps)", "one alert for the flaky spell, not one per gap; it settles after an hour on time", {
      reportIntervalS: 300,
      readings: [temperature(points)],
      times: every(MIN, T0, to),
    }),
    // three missed reports (15 min) make a probe silent: common practice
    expect: [{ kind: "silent_probe", level: "heads_up", causeAt: firstGap + 15 * MIN, withinMin: 1, source: "common practice" }],
    settledByEnd: ["silent_probe"],
  };
}

// 8. A moisture probe that reports whole percent in a stable bed (true 78.3 %) for 36 h.
function wholePercentProbe(): Scenario {
  const r = seeded(8);
  const to = T0 + 36 * HOUR;
  return {
    ...bed("whole-percent moisture probe", "a steady bed reads the same whole percent for hours; that is not a stuck sensor", {
      reportIntervalS: 300,
      readings: [
        temperature(sample(() => 20 + r.noise(0.08), { to, everyMs: 5 * MIN, step: TEMP_STEP })),
        moisture(sample(() => 78.3 + r.noise(0.05), { to, everyMs: 5 * MIN, step: 1 })),
      ],
    }),
    expect: [],
  };
}

// 9. A winter room: the bed cools 0.5 °C/h from 16 °C at 18:00 down to 5 °C and stays there.
function winterRoom(): Scenario {
  const r = seeded(9);
  const from = T0 + 18 * HOUR;
  const to = T0 + 48 * HOUR;
  const temps = sample((t) => Math.max(5, 16 - Math.max(0, (0.5 * (t - from)) / HOUR)) + r.noise(0.05), { to, everyMs: 5 * MIN, step: TEMP_STEP });
  return {
    ...bed("winter room cooling to 5 °C", "red wigglers survive 0 °C (NC State Extension): a heads-up, never act now", {
      reportIntervalS: 300,
      readings: [temperature(temps)],
    }),
    // NC State Extension: ideal from 15 °C; held 10 min at 5-min reports
    expect: [{ kind: "chill", level: "heads_up", causeAt: firstWhen(temps, (v) => v < 15), withinMin: 15, source: "NC State Extension" }],
  };
}

// 10. A tropical bed of Indian blue worms steady at 28.5 °C (± 0.3 °C a day) for 3 days.
function tropicalBed(): Scenario {
  const r = seeded(10);
  const to = T0 + 3 * DAY;
  return {
    ...bed("tropical bed (P. excavatus) at 28.5 °C", "growth accelerates up to 30 °C (Edwards, Domínguez & Neuhauser 1998): comfortable", {
      species: speciesProfiles["perionyx-excavatus"],
      reportIntervalS: 300,
      readings: [
        temperature(sample((t) => 28.5 + 0.3 * Math.sin((TAU * (t - T0)) / DAY) + r.noise(0.05), { to, everyMs: 5 * MIN, step: TEMP_STEP })),
        moisture(sample(() => 80 + r.noise(0.2), { to, everyMs: 5 * MIN, step: 0.1 })),
      ],
    }),
    expect: [],
  };
}

// 11. A wet, nitrogen-rich feeding (C:N 18, 92 % moisture, 2 kg on 1 m²) at 18:00; from 18:30 the bed
// cools 0.4 °C/h through the evening. Replayed for 8 h after the feeding.
function wetMixCooling(): Scenario {
  const r = seeded(11);
  const fedAt = T0 + 18 * HOUR;
  const to = fedAt + 8 * HOUR;
  const temp = (t: number) => 23 - Math.min(4, Math.max(0, (0.4 * (t - fedAt - 30 * MIN)) / HOUR));
  return {
    ...bed("wet mix, falling temperature", "ammonia risk from a wet, nitrogen-rich feed passes once the bed cools", {
      reportIntervalS: 60,
      bed: squareMetre,
      feedings: [{ at: fedAt, zoneId: null, totalKg: 2, mixCn: 18, mixMoisturePct: 92 }],
      readings: [temperature(sample((t) => temp(t) + r.noise(0.03), { to, everyMs: MIN, step: TEMP_STEP }))],
    }),
    // Cornell Waste Management Institute, "Compost Chemistry": below ~30:1 nitrogen leaves as ammonia; held 10 min
    expect: [{ kind: "ammonia", level: "heads_up", causeAt: fedAt, withinMin: 15, source: "Cornell, Compost Chemistry" }],
    settledByEnd: ["ammonia"],
  };
}

const LIBRARY = [
  steadyBed,
  outdoorSwing,
  heavyFeedOutdoors,
  lightFeed,
  hourlyProbe,
  irregularArrivals,
  probeWithGaps,
  wholePercentProbe,
  winterRoom,
  tropicalBed,
  wetMixCooling,
];

const scores: Score[] = [];

afterAll(() => {
  if (scores.length !== LIBRARY.length) return;
  const t = table(scores);
  writeTable(scores);
  console.log(`\n${t}\n`);
});

describe("scenario library", () => {
  for (const make of LIBRARY) {
    const s = make();
    it(`${s.name}: ${s.expect.length ? `raises ${s.expect.map((e) => `${e.kind} ${e.level} within ${e.withinMin} min (${e.source})`).join(", ")}` : "raises nothing"}; ${s.why}`, () => {
      const x = score(s);
      scores.push(x);
      expect(x.missed, "every expected alert, in time").toEqual([]);
      expect(x.falseAlarms, "no other alert").toEqual([]);
      for (const kind of s.settledByEnd ?? []) expect(x.openAtEnd, `${kind} settled by the end`).not.toContain(kind);
    });
  }
});

describe("the scenarios test something", () => {
  it("a scenario with a missed line and a flapping alert scores both", () => {
    // the hourly probe judged against an expectation it cannot meet, and the gaps without their alert
    const hourly = hourlyProbe();
    const tooSoon = score({ ...hourly, expect: hourly.expect.map((e) => ({ ...e, withinMin: 10 })) });
    expect(tooSoon.missed).toHaveLength(2);
    expect(tooSoon.falseAlarms).toHaveLength(2);
    const gaps = probeWithGaps();
    expect(score({ ...gaps, expect: [] }).falseAlarms.map((f) => f.kind)).toEqual(["silent_probe"]);
  });
});
