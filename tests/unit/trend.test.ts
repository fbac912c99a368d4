import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { HOUR_MS, linearFit, predictCrossing, ratePerHour, type SeriesPoint } from "@/lib/domain/trend";

const t0 = Date.UTC(2025, 5, 1, 6, 0, 0);
const minutes = (m: number) => t0 + m * 60_000;

/** One reading a minute for `n` minutes along v = start + perHour·h. */
function line(start: number, perHour: number, n: number): SeriesPoint[] {
  return Array.from({ length: n }, (_, i) => ({ t: minutes(i), v: start + (perHour * i) / 60 }));
}

describe("rate of change", () => {
  it("a bed warming 2 °C an hour reads +2 °C/h", () => {
    expect(ratePerHour(line(22, 2, 61))).toBeCloseTo(2, 9);
  });

  it("uses only the window", () => {
    // flat for an hour, then rising 6 °C/h for the last 30 minutes
    const flat = line(22, 0, 60);
    const rising = Array.from({ length: 31 }, (_, i) => ({ t: minutes(60 + i), v: 22 + (6 * i) / 60 }));
    const series = [...flat, ...rising];
    expect(ratePerHour(series, { windowMs: 30 * 60_000 })).toBeCloseTo(6, 9);
    expect(ratePerHour(series)!).toBeLessThan(6);
  });

  it("is the least-squares slope of noisy readings", () => {
    const pts = [
      { t: 0, v: 1 },
      { t: HOUR_MS, v: 3 },
      { t: 2 * HOUR_MS, v: 2 },
      { t: 3 * HOUR_MS, v: 5 },
    ];
    // by hand: t̄ = 1.5 h, v̄ = 2.75; Σ(t−t̄)(v−v̄) = 5.5, Σ(t−t̄)² = 5 → 1.1 per hour
    expect(ratePerHour(pts)).toBeCloseTo(1.1, 12);
    const fit = linearFit(pts)!;
    expect(fit.slope * HOUR_MS).toBeCloseTo(1.1, 12);
    expect(fit.intercept).toBeCloseTo(2.75 - 1.1 * 1.5, 12);
  });

  it("cannot tell a rate from one reading or one instant", () => {
    expect(ratePerHour([])).toBeNull();
    expect(ratePerHour([{ t: t0, v: 20 }])).toBeNull();
    expect(
      ratePerHour([
        { t: t0, v: 20 },
        { t: t0, v: 21 },
      ]),
    ).toBeNull();
    expect(ratePerHour(line(20, 1, 10), { windowMs: 0 })).toBeNull();
  });

  it("skips readings that are not numbers", () => {
    const pts = [...line(20, 3, 30), { t: minutes(31), v: Number.NaN }];
    expect(ratePerHour(pts)).toBeCloseTo(3, 9);
  });
});

describe("predicted crossing", () => {
  it("a bed at 26 °C rising 3 °C/h reaches 35 °C in 3 hours", () => {
    const series = line(26, 3, 1);
    series.push({ t: minutes(60), v: 29 });
    expect(predictCrossing(series, 35)).toBe(minutes(60) + 2 * HOUR_MS);
  });

  it("never, when flat or heading away", () => {
    expect(predictCrossing(line(22, 0, 30), 35)).toBeNull();
    expect(predictCrossing(line(30, -2, 30), 35)).toBeNull();
    expect(predictCrossing(line(22, 2, 30), Number.NaN)).toBeNull();
  });

  it("none ahead once the line is already past the bound", () => {
    expect(predictCrossing(line(36, 1, 30), 35)).toBeNull();
  });

  it("works for falling series and lower bounds", () => {
    const at = predictCrossing(line(20, -2, 61), 10);
    expect(at).toBeCloseTo(t0 + 5 * HOUR_MS, 0);
  });

  it("is exact for a straight series", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -20, max: 60, noNaN: true }),
        fc.double({ min: 0.05, max: 20, noNaN: true }),
        fc.constantFrom(1, -1),
        fc.integer({ min: 2, max: 120 }),
        fc.double({ min: 0.1, max: 48, noNaN: true }),
        (start, speed, sign, n, hoursAhead) => {
          const perHour = sign * speed;
          const series = line(start, perHour, n);
          const last = series.at(-1)!;
          const bound = last.v + perHour * hoursAhead;
          const expected = last.t + hoursAhead * HOUR_MS;
          const at = predictCrossing(series, bound);
          expect(at).not.toBeNull();
          // within a millisecond, over times of order 1.7e12 ms
          expect(Math.abs(at! - expected)).toBeLessThan(1);
        },
      ),
    );
  });
});
