// SWR keys shared by server pages (to prime the cache) and client hooks (to read it); every key is
// built here and nowhere else.
export const todayKey = (farmId: string | null) => (farmId ? `/api/farms/${farmId}/today` : null);
export const feedingsKey = (binId: string | null) => (binId ? `/api/bins/${binId}/feedings` : null);
export const ingredientsKey = (farmId: string | null) => (farmId ? `/api/farms/${farmId}/ingredients` : null);
export const logbookKey = (binId: string | null) => (binId ? `/api/bins/${binId}/logbook` : null);
/** The farm logbook with its filters as a query string (without "?"), as the page's URL has them. */
export const farmLogbookKey = (farmId: string | null, search = "") => (farmId ? `/api/farms/${farmId}/logbook${search ? `?${search}` : ""}` : null);
/** Matches any farm logbook key, whatever its filters. */
export const isFarmLogbookKey = (key: unknown): boolean => typeof key === "string" && /^\/api\/farms\/[^/?]+\/logbook(\?|$)/.test(key);
export const probeCalibrationKey = (probeId: number | null) => (probeId != null ? `/api/probes/${probeId}/calibration` : null);
export const probeHealthKey = (probeId: number | null) => (probeId != null ? `/api/probes/${probeId}/health` : null);
export const probesKey = (farmId: string | null) => (farmId ? `/api/farms/${farmId}/probes` : null);
export const binRulesKey = (binId: string | null) => (binId ? `/api/bins/${binId}/rules` : null);
/** Matches the Today key of any farm. */
export const isTodayKey = (key: unknown): boolean => typeof key === "string" && /^\/api\/farms\/[^/?]+\/today$/.test(key);

export type SeriesTarget = { zoneId: string } | { probeId: number };
export type SeriesWindow = { metric: string; from?: Date | string; to?: Date | string };

const iso = (t: Date | string) => (typeof t === "string" ? t : t.toISOString());

/** A zone's or probe's series for one metric and window, or null until both the target and the metric are known. */
export function seriesKey(target: SeriesTarget | null | undefined, window: SeriesWindow | null | undefined): string | null {
  if (!target || !window?.metric) return null;
  const base = "zoneId" in target ? `/api/zones/${encodeURIComponent(target.zoneId)}/series` : `/api/probes/${target.probeId}/series`;
  const q = new URLSearchParams({ metric: window.metric });
  if (window.from) q.set("from", iso(window.from));
  if (window.to) q.set("to", iso(window.to));
  return `${base}?${q}`;
}

/** The key useSeries asks for with ({ zoneId }, { metric, from }), for server pages that prime it. */
export const zoneSeriesKey = (zoneId: string, metric: string, from?: string) => seriesKey({ zoneId }, { metric, from })!;

/** A bin's series (one line per zone) for one metric and window, or null until the bin is known. */
export function binSeriesKey(binId: string | null | undefined, window: SeriesWindow): string | null {
  if (!binId || !window.metric) return null;
  const q = new URLSearchParams({ metric: window.metric });
  if (window.from) q.set("from", iso(window.from));
  if (window.to) q.set("to", iso(window.to));
  return `/api/bins/${encodeURIComponent(binId)}/series?${q}`;
}
