// SWR keys shared by server pages (to prime the cache) and client hooks (to read it).
export const todayKey = (farmId: string | null) => (farmId ? `/api/farms/${farmId}/today` : null);
export const feedingsKey = (binId: string | null) => (binId ? `/api/bins/${binId}/feedings` : null);
export const ingredientsKey = (farmId: string | null) => (farmId ? `/api/farms/${farmId}/ingredients` : null);
/** The same path lib/client/hooks/use-series.ts asks for ({ zoneId }, { metric, from }), for server pages that prime it. */
export const zoneSeriesKey = (zoneId: string, metric: string, from?: string) => {
  const q = new URLSearchParams({ metric });
  if (from) q.set("from", from);
  return `/api/zones/${encodeURIComponent(zoneId)}/series?${q}`;
};
export const logbookKey = (binId: string | null) => (binId ? `/api/bins/${binId}/logbook` : null);
export const probeCalibrationKey = (probeId: number | null) => (probeId != null ? `/api/probes/${probeId}/calibration` : null);
export const probesKey = (farmId: string | null) => (farmId ? `/api/farms/${farmId}/probes` : null);
export const binRulesKey = (binId: string | null) => (binId ? `/api/bins/${binId}/rules` : null);
/** Matches the Today key of any farm. */
export const isTodayKey = (key: unknown): boolean => typeof key === "string" && /^\/api\/farms\/[^/?]+\/today$/.test(key);
