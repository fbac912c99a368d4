import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  applyCalibration,
  dryToWetBasis,
  fitCalibration,
  moistureDryBasis,
  moistureWetBasis,
  wetToDryBasis,
  withinCalibratedRange,
} from "@/lib/domain/calibration";
import type { Result } from "@/lib/domain/result";

function value<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`expected ok, got ${r.error.field}: ${r.error.message}`);
  return r.value;
}

describe("oven-dry sample", () => {
  it("10 g of wet grass drying to 2.3 g is 77 % moisture", () => {
    // Cornell Waste Management Institute, "Moisture Content" (Richard & Trautmann), worked example:
    // 10 g wet grass in a 4 g container, 6.3 g after 24 h at 105–110 °C
    expect(value(moistureWetBasis({ wetMassG: 14, dryMassG: 6.3, tareG: 4 }))).toBeCloseTo(77, 10);
    expect(value(moistureWetBasis({ wetMassG: 10, dryMassG: 2.3 }))).toBeCloseTo(77, 10);
  });

  it("25 % on a dry basis is 20 % on a wet basis", () => {
    // San Joaquin County EHD report, ADC moisture discussion: ASTM D2216 25 % dry basis =
    // 80 g solids + 20 g water in 100 g = 20 % wet basis
    expect(value(moistureDryBasis({ wetMassG: 100, dryMassG: 80 }))).toBeCloseTo(25, 10);
    expect(value(moistureWetBasis({ wetMassG: 100, dryMassG: 80 }))).toBeCloseTo(20, 10);
    expect(value(dryToWetBasis(25))).toBeCloseTo(20, 10);
    expect(value(wetToDryBasis(20))).toBeCloseTo(25, 10);
  });

  it("1250 g moist, 885 g oven-dry is 41.2 % dry basis and 29.2 % wet basis", () => {
    // UBC APBI 200 practice question, inputs as published; it prints no answers, so these are recomputed
    expect(value(moistureDryBasis({ wetMassG: 1250, dryMassG: 885 }))).toBeCloseTo(41.24, 2);
    expect(value(moistureWetBasis({ wetMassG: 1250, dryMassG: 885 }))).toBeCloseTo(29.2, 2);
  });

  it("dry and wet basis convert both ways (F6)", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 99.9, noNaN: true }), (wet) => {
        expect(value(dryToWetBasis(value(wetToDryBasis(wet))))).toBeCloseTo(wet, 8);
      }),
    );
  });

  it("refuses impossible weighings", () => {
    expect(moistureWetBasis({ wetMassG: 10, dryMassG: 11 })).toMatchObject({ ok: false, error: { field: "dryMassG" } });
    expect(moistureWetBasis({ wetMassG: 4, dryMassG: 4, tareG: 4 })).toMatchObject({ ok: false, error: { field: "wetMassG" } });
    expect(moistureWetBasis({ wetMassG: 14, dryMassG: 3, tareG: 4 })).toMatchObject({ ok: false, error: { field: "dryMassG" } });
    expect(moistureWetBasis({ wetMassG: -1, dryMassG: 0 })).toMatchObject({ ok: false, error: { field: "wetMassG" } });
    expect(moistureWetBasis({ wetMassG: Number.NaN, dryMassG: 1 })).toMatchObject({ ok: false, error: { field: "wetMassG" } });
    expect(moistureDryBasis({ wetMassG: 10, dryMassG: 0 })).toMatchObject({ ok: false, error: { field: "dryMassG" } });
    expect(wetToDryBasis(100).ok).toBe(false);
    expect(wetToDryBasis(-1).ok).toBe(false);
    expect(dryToWetBasis(Number.POSITIVE_INFINITY).ok).toBe(false);
  });
});

describe("probe calibration", () => {
  // a worked example of our own, recomputed independently: θ = −0.0025·raw + 1.35, R² = 1; here in percent (θ × 100)
  const knownLine = [
    { raw: 520, moisturePct: 5 },
    { raw: 480, moisturePct: 15 },
    { raw: 440, moisturePct: 25 },
    { raw: 400, moisturePct: 35 },
    { raw: 360, moisturePct: 45 },
  ];

  it("recovers a known line exactly", () => {
    // slope −0.0025 per count (−0.25 points), intercept 1.35 (135 %), raw 450 → 0.225
    const cal = value(fitCalibration(knownLine));
    expect(cal.slope).toBeCloseTo(-0.25, 12);
    expect(cal.intercept).toBeCloseTo(135, 10);
    expect(cal.r2).toBeCloseTo(1, 12);
    for (const r of cal.residuals) expect(Math.abs(r)).toBeLessThan(1e-10);
    expect(applyCalibration(cal, 450)).toBeCloseTo(22.5, 10);
    expect(cal).toMatchObject({ n: 5, rawMin: 360, rawMax: 520 });
  });

  it("reports residuals and a lower R² for scattered samples", () => {
    const cal = value(
      fitCalibration([
        { raw: 300, moisturePct: 80 },
        { raw: 400, moisturePct: 72 },
        { raw: 500, moisturePct: 61 },
        { raw: 600, moisturePct: 55 },
      ]),
    );
    expect(cal.r2).toBeGreaterThan(0.9);
    expect(cal.r2).toBeLessThan(1);
    expect(cal.residuals.reduce((s, r) => s + r, 0)).toBeCloseTo(0, 10);
    expect(cal.residuals[0]).toBeCloseTo(80 - (cal.intercept + cal.slope * 300), 10);
  });

  it("recovers any straight line from its own points", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -1, max: 1, noNaN: true }),
        fc.double({ min: -500, max: 500, noNaN: true }),
        fc.uniqueArray(fc.integer({ min: 0, max: 4095 }), { minLength: 2, maxLength: 12 }),
        (slope, intercept, raws) => {
          const cal = value(fitCalibration(raws.map((raw) => ({ raw, moisturePct: intercept + slope * raw }))));
          expect(cal.slope).toBeCloseTo(slope, 8);
          expect(cal.intercept).toBeCloseTo(intercept, 5);
        },
      ),
    );
  });

  it("refuses fewer than two distinct raw readings, with a reason", () => {
    for (const points of [
      [],
      [{ raw: 400, moisturePct: 70 }],
      [
        { raw: 400, moisturePct: 70 },
        { raw: 400, moisturePct: 75 },
      ],
    ]) {
      const r = fitCalibration(points);
      expect(r).toMatchObject({ ok: false, error: { field: "points" } });
      if (!r.ok) expect(r.error.message).toMatch(/two/);
    }
    expect(
      fitCalibration([
        { raw: 1, moisturePct: Number.NaN },
        { raw: 2, moisturePct: 3 },
      ]),
    ).toMatchObject({
      ok: false,
      error: { field: "points.0.moisturePct" },
    });
  });

  it("holds applied values to 0–100 % and refuses non-numbers", () => {
    const cal = value(fitCalibration(knownLine));
    expect(applyCalibration(cal, 0)).toBe(100);
    expect(applyCalibration(cal, 1000)).toBe(0);
    expect(applyCalibration(cal, Number.NaN)).toBeNull();
    expect(withinCalibratedRange(cal, 450)).toBe(true);
    expect(withinCalibratedRange(cal, 600)).toBe(false);
  });

  it("gives R² of 1 when every sample has the same moisture", () => {
    const cal = value(
      fitCalibration([
        { raw: 1, moisturePct: 70 },
        { raw: 2, moisturePct: 70 },
      ]),
    );
    expect(cal).toMatchObject({ slope: 0, intercept: 70, r2: 1 });
  });
});
