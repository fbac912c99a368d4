// How well a probe's fitted line matches its oven samples, said before the slope and R²
// (lib/domain/calibration.ts calibrationMatch).
import { describe, expect, it } from "vitest";
import { calibrationMatch, fitCalibration } from "@/lib/domain/calibration";

describe("the plain-words match of a calibration", () => {
  it("samples all within 2 points of the line are a close match", () => {
    const fit = fitCalibration([
      { raw: 300, moisturePct: 60.5 },
      { raw: 400, moisturePct: 69 },
      { raw: 500, moisturePct: 80.5 },
    ]);
    if (!fit.ok) throw new Error("fit failed");
    const m = calibrationMatch(fit.value);
    expect(m.level).toBe("close");
    expect(m.headline).toBe("Close match: readings within ±2 points of the oven samples.");
    // worst residual: 1.0 points (the middle sample sits 1 point under the line)
    expect(m.detail).toBe("At worst, the line is within ±1 points of every oven sample.");
  });

  it("a worst sample between 2 and 5 points off is fair, more than 5 is loose", () => {
    expect(calibrationMatch({ n: 4, residuals: [0.5, -3.2, 1, 1.7] })).toMatchObject({
      level: "fair",
      headline: expect.stringMatching(/^Fair match: .*±5 points/),
    });
    expect(calibrationMatch({ n: 4, residuals: [0.5, -3.2, 1, 1.7] }).detail).toMatch(/within ±3\.2 points/);
    expect(calibrationMatch({ n: 3, residuals: [6, -3, -3] })).toMatchObject({
      level: "loose",
      headline: expect.stringMatching(/^Loose match: .*more than 5 points off/),
    });
    // the boundaries belong to the better word
    expect(calibrationMatch({ n: 3, residuals: [2, -1, -1] }).level).toBe("close");
    expect(calibrationMatch({ n: 3, residuals: [5, -2.5, -2.5] }).level).toBe("fair");
  });

  it("two samples are not called a match: a line always runs through two points", () => {
    const m = calibrationMatch({ n: 2, residuals: [0, 0] });
    expect(m.level).toBe("too-few");
    expect(m.headline).not.toMatch(/match:/);
    expect(m.detail).toMatch(/third sample/);
  });
});
