import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { evaluateZone, replay, type RuleOverrides, type Transition } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";

// E. fetida heat: heads-up above 25 °C held 10 min, act now at 30 °C held 10 min, settle at or
// below 24.5 °C (deadband 0.5 °C) held 15 min.
const t0 = Date.UTC(2025, 5, 1, 6, 0, 0);
const MIN = 60_000;
const at = (m: number) => t0 + m * MIN;
const fetida = speciesProfiles["eisenia-fetida"];
const zone = { id: "zone-1", kind: "fresh", binName: "Long Bed North" } as const;
const probes = [{ id: 7, code: "p-7", reportIntervalS: 60, lastSeenAt: null, metrics: ["temperature"] }];

function heatEvents(values: readonly number[], overrides: RuleOverrides = {}) {
  const steps = replay(
    {
      zone,
      species: fetida,
      overrides,
      readings: [{ probeId: 7, metric: "temperature", points: values.map((v, m) => ({ t: at(m), v })) }],
      recentFeedings: [],
      probes,
      kinds: ["heat"],
    },
    values.map((_, m) => at(m)),
  );
  const events = steps.flatMap((s) => s.transitions.filter((t) => t.type !== "update").map((t) => ({ minute: (s.at - t0) / MIN, t })));
  return { steps, events };
}

/** Do all readings at minutes m−span … m satisfy `ok`? */
const heldOver = (values: readonly number[], m: number, span: number, ok: (v: number) => boolean) =>
  m - span >= 0 && Array.from({ length: span + 1 }, (_, k) => values[m - k]!).every(ok);

const noise = (n: number) => fc.array(fc.double({ min: -0.3, max: 0.3, noNaN: true }), { minLength: n, maxLength: n });

describe("no flapping", () => {
  it("noise of ±0.3 °C around the heads-up line raises at most once and never settles, whatever the holds", () => {
    // Short holds leave the 0.5 °C deadband alone to stop the flapping.
    const scenario = fc.record({
      raiseMinutes: fc.constantFrom(0, 1, 2, 5, 10),
      settleMinutes: fc.constantFrom(0, 1, 2, 15),
      ns: fc.integer({ min: 30, max: 400 }).chain((n) => noise(n)),
    });
    fc.assert(
      fc.property(scenario, ({ raiseMinutes, settleMinutes, ns }) => {
        const values = ns.map((x) => 25 + x);
        const { events } = heatEvents(values, { heat: { thresholds: { raiseMinutes, settleMinutes } } });
        const raises = events.filter((e) => e.t.type === "raise");
        expect(raises.length).toBeLessThanOrEqual(1);
        expect(events.filter((e) => e.t.type === "settle")).toEqual([]);
        for (const r of raises) expect(heldOver(values, r.minute, raiseMinutes, (v) => v > 25)).toBe(true);
        // with no hold the first reading above the line raises
        const firstAbove = values.findIndex((v) => v > 25);
        if (raiseMinutes === 0 && firstAbove >= 0) expect(raises.map((r) => r.minute)).toEqual([firstAbove]);
      }),
      { numRuns: 80 },
    );
  });

  it("once raised, it settles exactly 15 min after the series moves past the deadband, and not before", () => {
    const scenario = fc.record({
      before: fc.integer({ min: 0, max: 150 }).chain(noise),
      hot: fc.integer({ min: 11, max: 60 }).chain(noise),
      wander: fc.integer({ min: 0, max: 150 }).chain(noise),
      // past the deadband: 24.5 °C down to 23.5 °C
      cool: fc.integer({ min: 0, max: 40 }).chain((n) => fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: n, maxLength: n })),
      after: fc.integer({ min: 0, max: 100 }).chain(noise),
    });
    fc.assert(
      fc.property(scenario, (sc) => {
        const values = [
          ...sc.before.map((x) => 25 + x),
          ...sc.hot.map((x) => 26 + x),
          ...sc.wander.map((x) => 25 + x),
          ...sc.cool.map((x) => 24.5 - x),
          ...sc.after.map((x) => 25 + x),
        ];
        const coolFrom = sc.before.length + sc.hot.length + sc.wander.length;
        const { events } = heatEvents(values);
        const settles = events.filter((e) => e.t.type === "settle");
        const firstSettle = settles[0]?.minute ?? Number.POSITIVE_INFINITY;
        // one raise, by the end of the hot stretch at the latest, and none again before a settle
        const raisesBefore = events.filter((e) => e.t.type === "raise" && e.minute < firstSettle);
        expect(raisesBefore).toHaveLength(1);
        expect(raisesBefore[0]!.minute).toBeLessThanOrEqual(sc.before.length + 10);
        // 16 readings past the deadband span 15 minutes
        if (sc.cool.length >= 16) expect(settles.map((e) => e.minute)).toEqual([coolFrom + 15]);
        else expect(settles).toEqual([]);
        // after settling, the noise may raise again, but only once and only after 10 min above the line
        const again = events.filter((e) => e.t.type === "raise" && e.minute > firstSettle);
        expect(again.length).toBeLessThanOrEqual(1);
        for (const r of again) expect(heldOver(values, r.minute, 10, (v) => v > 25)).toBe(true);
      }),
      { numRuns: 60 },
    );
  });

  it("on any random walk every transition is earned, none is missed, and raise and settle alternate", () => {
    const walk = fc.record({
      start: fc.double({ min: 22, max: 32, noNaN: true }),
      steps: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 30, maxLength: 300 }),
    });
    fc.assert(
      fc.property(walk, ({ start, steps: deltas }) => {
        const values: number[] = [];
        let v = start;
        for (const d of deltas) values.push((v = Math.min(36, Math.max(20, v + d))));
        const { steps } = heatEvents(values);
        let open: "heads_up" | "act_now" | null = null;
        for (const [m, step] of steps.entries()) {
          for (const t of step.transitions as Transition[]) {
            if (t.type === "raise") {
              expect(open).toBeNull();
              expect(heldOver(values, m, 10, (x) => x > 25)).toBe(true);
              if (t.level === "act_now") expect(heldOver(values, m, 10, (x) => x >= 30)).toBe(true);
              open = t.level;
            } else if (t.type === "escalate") {
              expect(open).toBe("heads_up");
              expect(heldOver(values, m, 10, (x) => x >= 30)).toBe(true);
              open = "act_now";
            } else if (t.type === "settle") {
              expect(open).not.toBeNull();
              expect(heldOver(values, m, 15, (x) => x <= 24.5)).toBe(true);
              open = null;
            } else {
              expect(open).not.toBeNull();
            }
          }
          // nothing earned is left undone
          if (heldOver(values, m, 10, (x) => x > 25)) expect(open).not.toBeNull();
          if (heldOver(values, m, 10, (x) => x >= 30)) expect(open).toBe("act_now");
          if (heldOver(values, m, 15, (x) => x <= 24.5)) expect(open).toBeNull();
        }
      }),
      { numRuns: 60 },
    );
  });
});

describe("determinism", () => {
  it("the same readings in any order give the same transitions", () => {
    const input = fc.record({
      values: fc.array(fc.double({ min: 10, max: 40, noNaN: true }), { minLength: 20, maxLength: 200 }),
      moisture: fc.array(fc.double({ min: 40, max: 95, noNaN: true }), { minLength: 20, maxLength: 200 }),
      seed: fc.integer(),
    });
    fc.assert(
      fc.property(input, ({ values, moisture, seed }) => {
        const temp = values.map((v, m) => ({ t: at(m), v }));
        const wet = moisture.map((v, m) => ({ t: at(m), v }));
        const shuffled = <T>(xs: T[]) => {
          let s = seed;
          const out = [...xs];
          for (let i = out.length - 1; i > 0; i--) {
            s = (s * 1103515245 + 12345) & 0x7fffffff;
            const j = s % (i + 1);
            [out[i], out[j]] = [out[j]!, out[i]!];
          }
          return out;
        };
        const base = {
          now: at(Math.max(values.length, moisture.length) - 1),
          zone,
          species: fetida,
          recentFeedings: [{ at: at(0), zoneId: null, mixCn: 18, mixMoisturePct: 88 }],
          probes: [{ ...probes[0]!, metrics: ["temperature", "moisture"] }],
          openAlerts: [],
        };
        const a = evaluateZone({
          ...base,
          readings: [
            { probeId: 7, metric: "temperature", points: temp },
            { probeId: 7, metric: "moisture", points: wet },
          ],
        });
        const b = evaluateZone({
          ...base,
          readings: [
            { probeId: 7, metric: "moisture", points: shuffled(wet) },
            { probeId: 7, metric: "temperature", points: shuffled(temp) },
          ],
        });
        expect(b).toEqual(a);
        expect(
          evaluateZone({
            ...base,
            readings: [
              { probeId: 7, metric: "temperature", points: temp },
              { probeId: 7, metric: "moisture", points: wet },
            ],
          }),
        ).toEqual(a);
      }),
      { numRuns: 100 },
    );
  });
});
