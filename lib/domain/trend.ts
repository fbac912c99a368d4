// Trends over readings: least-squares slope, rate per hour over a window, and when a straight-line
// trend reaches a bound. Times are epoch milliseconds (Date.getTime()); values in stored units.

export type SeriesPoint = { t: number; v: number };
export type LinearFit = { slope: number; intercept: number; n: number };

export const HOUR_MS = 3_600_000;

function usable(points: readonly SeriesPoint[]): SeriesPoint[] {
  return points.filter((p) => Number.isFinite(p.t) && Number.isFinite(p.v));
}

type CentredFit = { slope: number; tMean: number; vMean: number; n: number };

// Centred on the means: epoch milliseconds squared would lose the digits that matter.
function centredFit(points: readonly SeriesPoint[]): CentredFit | null {
  const ps = usable(points);
  if (ps.length < 2) return null;
  const n = ps.length;
  const tMean = ps.reduce((s, p) => s + p.t, 0) / n;
  const vMean = ps.reduce((s, p) => s + p.v, 0) / n;
  let stt = 0;
  let stv = 0;
  for (const p of ps) {
    stt += (p.t - tMean) ** 2;
    stv += (p.t - tMean) * (p.v - vMean);
  }
  if (stt === 0) return null;
  return { slope: stv / stt, tMean, vMean, n };
}

/** Least-squares line v = intercept + slope·t; null without two distinct times. Non-finite points are skipped. */
export function linearFit(points: readonly SeriesPoint[]): LinearFit | null {
  const f = centredFit(points);
  return f && { slope: f.slope, intercept: f.vMean - f.slope * f.tMean, n: f.n };
}

export type WindowOptions = {
  /** Only points with t in [end − windowMs, end] are used. */
  windowMs?: number;
  /** End of the window; defaults to the latest point's time. */
  now?: number;
};

function inWindow(points: readonly SeriesPoint[], opts: WindowOptions): { points: SeriesPoint[]; end: number } | null {
  const ps = usable(points);
  if (ps.length === 0) return null;
  const end = opts.now ?? ps.reduce((m, p) => Math.max(m, p.t), -Infinity);
  const start = opts.windowMs === undefined ? -Infinity : end - opts.windowMs;
  return { points: ps.filter((p) => p.t >= start && p.t <= end), end };
}

/** Rate of change per hour (°C/h for temperature) over the window; null when it cannot be told. */
export function ratePerHour(points: readonly SeriesPoint[], opts: WindowOptions = {}): number | null {
  const w = inWindow(points, opts);
  const fit = w && linearFit(w.points);
  return fit ? fit.slope * HOUR_MS : null;
}

/**
 * Time (epoch ms) when the fitted line over the window reaches `bound`, or null when it never will:
 * the line is flat, heads away from the bound, or crossed it before the end of the window (a reading
 * already past the bound is the threshold rule's business, not a prediction).
 */
export function predictCrossing(points: readonly SeriesPoint[], bound: number, opts: WindowOptions = {}): number | null {
  if (!Number.isFinite(bound)) return null;
  const w = inWindow(points, opts);
  const fit = w && centredFit(w.points);
  if (!w || !fit || fit.slope === 0) return null;
  const at = fit.tMean + (bound - fit.vMean) / fit.slope;
  if (!Number.isFinite(at) || at < w.end) return null;
  return at;
}
