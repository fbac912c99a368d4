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

/** How long a condition has held over the latest run, at least `needMs` and `minCount` readings. */
export const holdsFor = (s: readonly { t: number }[], holds: (i: number) => boolean, maxGapMs: number, needMs: number, minCount = 1): boolean => {
  if (minCount <= 1) return heldFor(s, holds, maxGapMs, needMs) >= needMs;
  const last = s.length - 1;
  if (last < 0 || !holds(last)) return false;
  let k = last;
  const enough = () => last - k + 1 >= minCount && s[last]!.t - s[k]!.t >= needMs;
  while (!enough() && k > 0 && s[k]!.t - s[k - 1]!.t <= maxGapMs && holds(k - 1)) k--;
  return enough();
};

/** The sample at or just before t, if it is no further than maxGapMs from t. */
export function atOrBefore(s: readonly Sample[], t: number, maxGapMs: number): number | null {
  const j = firstAtOrAfter(s, t + 1) - 1;
  return j >= 0 && t - s[j]!.t <= maxGapMs ? j : null;
}

/**
 * The rate at sample i less the zone's own rhythm: the median of the rates at the same clock time
 * on each of the `days` previous days that have readings then (0 when none has). An outdoor bed
 * warming every morning at 1 °C/h has no excess; a feeding heating it on top of that has.
 */
export function rhythmExcessAt(
  s: readonly Sample[],
  i: number,
  windowMs: number,
  maxGapMs: number,
  days: number,
): { rate: number | null; usual: number | null; excess: number | null } {
  const rate = rateAt(s, i, windowMs, maxGapMs);
  const past: number[] = [];
  for (let d = 1; d <= days; d++) {
    const j = atOrBefore(s, s[i]!.t - d * DAY_MS, maxGapMs);
    const r = j === null ? null : rateAt(s, j, windowMs, maxGapMs);
    if (r !== null) past.push(r);
  }
  const usual = median(past);
  return { rate, usual, excess: rate === null ? null : rate - (usual ?? 0) };
}

const DAY_MS = 24 * HOUR_MS;

function median(xs: number[]): number | null {
  if (xs.length === 0) return null;
  const o = [...xs].sort((a, b) => a - b);
  const m = o.length >> 1;
  return o.length % 2 ? o[m]! : (o[m - 1]! + o[m]!) / 2;
}

/**
 * The probe's own step: the smallest nonzero change between readings, or, when values never
 * change, the coarsest of 1, 0.5, 0.1 that every value is a multiple of; never finer than `least`.
 * A probe that reports whole percent moves in 1 % steps, so a steady bed reads the same for hours.
 */
export function resolutionOf(s: readonly Sample[], least: number): number {
  let step = Number.POSITIVE_INFINITY;
  for (let k = 1; k < s.length; k++) {
    const d = Math.abs(s[k]!.v - s[k - 1]!.v);
    if (d > 1e-9 && d < step) step = d;
  }
  const multiple = (q: number) => s.length > 0 && s.every((p) => Math.abs(p.v / q - Math.round(p.v / q)) < 1e-6);
  const grain = [1, 0.5, 0.1].find(multiple) ?? least;
  return Math.max(least, Math.min(step, grain));
}

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
