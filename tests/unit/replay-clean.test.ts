// replay() cleans each series once and hands every step its slice as already clean; an evaluation
// then takes the points as they are instead of copying them. The answer must be the same as an
// evaluation that cleans the same readings itself, step by step, as the live runner does.
import { describe, expect, it } from "vitest";
import { applyTransitions, evaluateZone, replay, resolveRules, type OpenAlert, type Transition } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";

const MIN = 60_000;
const species = speciesProfiles["eisenia-fetida"];

describe("replay's clean slices", () => {
  it("raise, escalate and settle at the same steps as evaluations that clean for themselves", () => {
    const start = Date.UTC(2026, 10, 1);
    const temp: { t: number; v: number }[] = [];
    const moist: { t: number; v: number }[] = [];
    for (let m = 0; m < 3 * 24 * 60; m += 2) {
      const t = start + m * MIN;
      // A heat spell past 30 °C (warm stress for E. fetida: Loehr et al. 1985) on the second day.
      const spell = m > 1700 && m < 1900 ? 12 : 0;
      temp.push({ t, v: 22 + spell });
      // A sensor error code now and then (-127 °C is the DS18B20's "no sensor" value, from memory), and
      // the moisture drying past the band's edge late on the third day.
      if (m % 97 === 0) temp.push({ t: t + MIN, v: -127 });
      moist.push({ t, v: m > 3800 ? 66 : 78 });
    }
    // Out of order and duplicated, as a probe catching up may send them.
    const shuffled = [...temp].reverse();
    const base = {
      zone: { id: "z1", kind: "fresh" as const, binName: "Test bin" },
      species,
      rules: resolveRules(species, {}),
      recentFeedings: [],
      probes: [{ id: 7, code: "t-7", reportIntervalS: 120, lastSeenAt: start + 3 * 86_400_000, metrics: ["temperature", "moisture"] }],
    };
    const times: number[] = [];
    for (let t = start + 60 * MIN; t < start + 3 * 86_400_000; t += 10 * MIN) times.push(t);

    const fast = replay(
      {
        ...base,
        readings: [
          { probeId: 7, metric: "temperature", points: shuffled },
          { probeId: 7, metric: "moisture", points: moist },
        ],
      },
      times,
    );

    let open: OpenAlert[] = [];
    const slow: Transition[][] = [];
    for (const at of times) {
      const upTo = (pts: { t: number; v: number }[]) => pts.filter((p) => p.t <= at && p.t >= at - 4 * 86_400_000);
      const readings = [
        { probeId: 7, metric: "temperature" as const, points: upTo(shuffled) },
        { probeId: 7, metric: "moisture" as const, points: upTo(moist) },
      ];
      const probes = base.probes.map((p) => ({ ...p, lastSeenAt: Math.min(p.lastSeenAt, at) }));
      const transitions = evaluateZone({ ...base, now: at, readings, probes, openAlerts: open });
      open = applyTransitions(open, transitions, at);
      slow.push(transitions);
    }
    const kinds = (steps: Transition[][]) =>
      steps.flatMap((ts, i) => ts.filter((t) => t.type !== "update").map((t) => `${times[i]} ${t.type} ${t.kind} ${t.level}`));
    expect(kinds(fast.map((s) => s.transitions))).toEqual(kinds(slow));
    // The series did raise something, so the comparison is not of two empty lists.
    expect(kinds(slow).some((k) => k.includes("raise heat"))).toBe(true);
    expect(kinds(slow).some((k) => k.includes("raise drying"))).toBe(true);
  });
});
