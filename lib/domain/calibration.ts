// Oven-dry samples and probe calibration.
// Two conventions for the same sample: Cornell's classroom method reports water / wet mass
// (wet basis, the trade's "moisture content"); ASTM D2216 reports water / dry solids (dry basis).
//   F6  MCdb = MCwb / (1 − MCwb), MCwb = MCdb / (1 + MCdb)   (fractions)
import { fail, ok, type Result } from "./result";

/** Oven temperatures a keeper may choose; the sample records which one was used. */
export const OVEN_METHODS = {
  // ASTM D2216: 110 ± 5 °C to constant mass, dry basis; warns that organic matter may decompose
  "astm-d2216": { ovenC: 110, basis: "dry" },
  // Cornell "Moisture Content" (Richard & Trautmann): 24 h at 105–110 °C, wet basis
  cornell: { ovenC: 105, basis: "wet" },
  // TMECC 03.09 "Total Solids and Moisture": 70 ± 5 °C (method details from memory)
  "tmecc-03.09": { ovenC: 70, basis: "wet" },
} as const;

export type OvenDrySample = {
  /** Mass before drying, grams; gross (with container) when tareG is given. */
  wetMassG: number;
  /** Mass after drying, grams; gross when tareG is given. */
  dryMassG: number;
  /** Container mass, grams. */
  tareG?: number;
};

function netMasses(s: OvenDrySample): Result<{ wet: number; dry: number }> {
  const tare = s.tareG ?? 0;
  for (const [field, v] of [
    ["wetMassG", s.wetMassG],
    ["dryMassG", s.dryMassG],
    ["tareG", tare],
  ] as const) {
    if (typeof v !== "number" || !Number.isFinite(v)) return fail(field, "Must be a number.");
    if (v < 0) return fail(field, "Cannot be negative.");
  }
  const wet = s.wetMassG - tare;
  const dry = s.dryMassG - tare;
  if (wet <= 0) return fail("wetMassG", "Wet mass must be more than the container.");
  if (dry < 0) return fail("dryMassG", "Dry mass cannot be less than the container.");
  if (dry > wet) return fail("dryMassG", "Dry mass cannot be more than wet mass.");
  return ok({ wet, dry });
}

/** Moisture content, % wet basis: (wet − dry) / wet × 100 (Cornell). */
export function moistureWetBasis(sample: OvenDrySample): Result<number> {
  const m = netMasses(sample);
  if (!m.ok) return m;
  return ok(((m.value.wet - m.value.dry) / m.value.wet) * 100);
}

/** Water content, % dry basis: (wet − dry) / dry × 100 (ASTM D2216). */
export function moistureDryBasis(sample: OvenDrySample): Result<number> {
  const m = netMasses(sample);
  if (!m.ok) return m;
  if (m.value.dry === 0) return fail("dryMassG", "No dry solids left: dry-basis water content is infinite.");
  return ok(((m.value.wet - m.value.dry) / m.value.dry) * 100);
}

/** F6: wet basis → dry basis, both in percent. */
export function wetToDryBasis(wetPct: number): Result<number> {
  if (!Number.isFinite(wetPct) || wetPct < 0 || wetPct >= 100) {
    return fail("moisturePct", "Wet-basis moisture must be at least 0 and below 100 %.");
  }
  return ok((wetPct / (100 - wetPct)) * 100);
}

/** F6: dry basis → wet basis, both in percent. Dry basis may exceed 100 %. */
export function dryToWetBasis(dryPct: number): Result<number> {
  if (!Number.isFinite(dryPct) || dryPct < 0) return fail("waterContentPct", "Dry-basis water content must be 0 % or more.");
  return ok((dryPct / (100 + dryPct)) * 100);
}

export type CalibrationPoint = { raw: number; moisturePct: number };

export type Calibration = {
  slope: number;
  intercept: number;
  r2: number;
  /** Sample moisture minus the fitted value, in the order the points were given. */
  residuals: number[];
  n: number;
  rawMin: number;
  rawMax: number;
};

/**
 * Least-squares line from raw probe readings (x) to oven-dry moisture (y), the regression
 * direction used in sensor calibration studies (Setiawan, Musa & Putri 2023).
 */
export function fitCalibration(points: readonly CalibrationPoint[]): Result<Calibration> {
  if (!Array.isArray(points)) return fail("points", "Give the samples as a list.");
  for (const [i, p] of points.entries()) {
    if (!Number.isFinite(p.raw)) return fail(`points.${i}.raw`, "Raw reading must be a number.");
    if (!Number.isFinite(p.moisturePct)) return fail(`points.${i}.moisturePct`, "Moisture must be a number.");
  }
  if (new Set(points.map((p) => p.raw)).size < 2) {
    return fail("points", "Needs samples at two or more different raw readings to draw a line.");
  }
  const n = points.length;
  const xMean = points.reduce((s, p) => s + p.raw, 0) / n;
  const yMean = points.reduce((s, p) => s + p.moisturePct, 0) / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (const p of points) {
    const dx = p.raw - xMean;
    const dy = p.moisturePct - yMean;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = sxy / sxx;
  const intercept = yMean - slope * xMean;
  const residuals = points.map((p) => p.moisturePct - (intercept + slope * p.raw));
  const ssRes = residuals.reduce((s, r) => s + r * r, 0);
  // When every sample has the same moisture the flat line explains all there is to explain.
  const r2 = syy === 0 ? 1 : Math.max(0, 1 - ssRes / syy);
  const raws = points.map((p) => p.raw);
  return ok({ slope, intercept, r2, residuals, n, rawMin: Math.min(...raws), rawMax: Math.max(...raws) });
}

/**
 * Moisture (% wet basis) for a raw reading, held to 0–100 % because wet-basis moisture cannot
 * leave that range; null when the reading or the calibration is not a number.
 */
export function applyCalibration(cal: Pick<Calibration, "slope" | "intercept">, raw: number): number | null {
  const y = cal.intercept + cal.slope * raw;
  if (!Number.isFinite(y)) return null;
  return Math.min(100, Math.max(0, y));
}

/** True when the raw reading lies inside the span of the samples the line was fitted to. */
export function withinCalibratedRange(cal: Pick<Calibration, "rawMin" | "rawMax">, raw: number): boolean {
  return raw >= cal.rawMin && raw <= cal.rawMax;
}

/** How well a fitted line matches its oven samples, said plainly before the numbers. */
export type CalibrationMatch = { level: "close" | "fair" | "loose" | "too-few"; headline: string; detail: string };

// Bands in moisture points (% wet basis) of the worst sample's distance from the line: our own
// choice for a keeper's reading, not from a standard or a published method (not verified). Within
// ±2 points a probe tells a comfortable bed from a drying one; beyond ±5 points it cannot.
const CLOSE_POINTS = 2;
const FAIR_POINTS = 5;

/** The worst residual of a fit, said in a keeper's words ("Close match: readings within ±2
 * points of the oven samples"). Two samples always sit on their own line, so they say nothing yet. */
export function calibrationMatch(cal: Pick<Calibration, "residuals" | "n">): CalibrationMatch {
  if (cal.n < 3) {
    return {
      level: "too-few",
      headline: `Too few samples to tell: ${cal.n} samples always sit on their own line.`,
      detail: "Record a third sample, at a different moisture, to see how well the probe matches the oven.",
    };
  }
  const worst = Math.max(...cal.residuals.map((r) => Math.abs(r)));
  const within = `the line is within ±${formatPoints(worst)} points of every oven sample`;
  if (worst <= CLOSE_POINTS) {
    return { level: "close", headline: `Close match: readings within ±${CLOSE_POINTS} points of the oven samples.`, detail: `At worst, ${within}.` };
  }
  if (worst <= FAIR_POINTS) {
    return {
      level: "fair",
      headline: `Fair match: readings within ±${FAIR_POINTS} points of the oven samples.`,
      detail: `At worst, ${within}. Good enough to watch for drying or soggy beds; more samples may tighten it.`,
    };
  }
  return {
    level: "loose",
    headline: `Loose match: some readings are more than ${FAIR_POINTS} points off the oven samples.`,
    detail: `At worst, ${within}. Check the probe sits firmly in the bedding, take new samples and fit again.`,
  };
}

// One decimal, without a trailing ".0" (rounded up, so "within" stays true).
const formatPoints = (p: number) => String(Math.ceil(p * 10 - 1e-9) / 10);
