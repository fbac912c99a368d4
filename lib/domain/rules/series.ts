// How long a condition has held over a series, and the per-reading measures the rules test. Each
// measure looks only at readings up to the one it is asked about, as the runner saw them then.
import { HOUR_MS, linearFit, predictCrossing, type SeriesPoint } from "../trend";

export type Sample = SeriesPoint;

/** Finite points in time order; of two at one instant the later-listed is kept. */
export function cleanSeries(points: readonly SeriesPoint[]): Sample[] {
  // Fast path: the database hands series over already in time order.
  let ordered = true;
  for (let i = 1; i < points.length && ordered; i++) ordered = points[i - 1]!.t < points[i]!.t;
  if (ordered) return points.filter((p) => Number.isFinite(p.t) && Number.isFinite(p.v)).map((p) => ({ t: p.t, v: p.v }));
  const byTime = new Map<number, number>();
  for (const p of points) if (Number.isFinite(p.t) && Number.isFinite(p.v)) byTime.set(p.t, p.v);
  return [...byTime.entries()].sort((a, b) => a[0] - b[0]).map(([t, v]) => ({ t, v }));
}

export function firstAtOrAfter(s: readonly Sample[], t: number): number {
  let lo = 0;
  let hi = s.length;
  while (lo < hi) {
    const m = (lo + hi) >> 1;
    if (s[m]!.t < t) lo = m + 1;
    else hi = m;
  }
  return lo;
}

/**
 * Time from first to last sample of the latest run where `holds` is true (-1: the last sample
 * fails). A gap wider than `maxGapMs` breaks a run: nobody knows what happened while the probe
 * was silent. Stops walking back once `enoughMs` is reached.
 */
export function heldFor(s: readonly { t: number }[], holds: (i: number) => boolean, maxGapMs: number, enoughMs = Number.POSITIVE_INFINITY): number {
  const last = s.length - 1;
  if (last < 0 || !holds(last)) return -1;
  const end = s[last]!.t;
  let k = last;
  while (k > 0 && end - s[k]!.t < enoughMs && s[k]!.t - s[k - 1]!.t <= maxGapMs && holds(k - 1)) k--;
  return end - s[k]!.t;
}

export const holdsFor = (s: readonly { t: number }[], holds: (i: number) => boolean, maxGapMs: number, needMs: number): boolean =>
  heldFor(s, holds, maxGapMs, needMs) >= needMs;

/** Least-squares rate per hour over the window ending at sample i; null unless readings cover it. */
export function rateAt(s: readonly Sample[], i: number, windowMs: number, maxGapMs: number): number | null {
  const end = s[i]?.t;
  if (end === undefined || s[0]!.t > end - windowMs) return null;
  const lo = firstAtOrAfter(s, end - windowMs);
  if (i - lo + 1 < 3 || s[lo]!.t - (end - windowMs) > maxGapMs) return null;
  const fit = linearFit(s.slice(lo, i + 1));
  return fit ? fit.slope * HOUR_MS : null;
}

export type Trend = { ratePerHour: number; crossingAt: number | null };

/** The line over the window ending at sample i and when it reaches `bound`; null below `minSpanMs`. */
export function trendAt(s: readonly Sample[], i: number, windowMs: number, minSpanMs: number, bound: number): Trend | null {
  const end = s[i]?.t;
  if (end === undefined) return null;
  const lo = firstAtOrAfter(s, end - windowMs);
  const pts = s.slice(lo, i + 1);
  if (pts.length < 3 || end - pts[0]!.t < minSpanMs) return null;
  const fit = linearFit(pts);
  if (!fit) return null;
  return { ratePerHour: fit.slope * HOUR_MS, crossingAt: predictCrossing(pts, bound, { now: end }) };
}

/**
 * How long before sample i every value stayed within less than one sensor step. Gaps do not break
 * it: a sensor stuck before a dropout is still stuck after it.
 */
export function unchangedFor(s: readonly Sample[], i: number, step: number): number {
  const at = s[i];
  if (!at) return 0;
  let min = at.v;
  let max = at.v;
  let k = i;
  while (k > 0) {
    const v = s[k - 1]!.v;
    const lo = Math.min(min, v);
    const hi = Math.max(max, v);
    if (hi - lo >= step) break;
    min = lo;
    max = hi;
    k--;
  }
  return at.t - s[k]!.t;
}
