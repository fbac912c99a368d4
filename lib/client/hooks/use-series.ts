import useSWR from "swr";
import type { Series } from "@/lib/client/wire";
import type { Metric } from "@/lib/domain/vocabulary";
import { fetcher } from "@/lib/client/fetcher";

export type SeriesTarget = { zoneId: string } | { probeId: number };
export type SeriesWindow = { metric: Metric; from?: Date | string; to?: Date | string };

const iso = (t: Date | string) => (typeof t === "string" ? t : t.toISOString());

/** The API path for a series, or null until both the target and the metric are known. */
export function seriesKey(target: SeriesTarget | null | undefined, window: SeriesWindow | null | undefined): string | null {
  if (!target || !window?.metric) return null;
  const base = "zoneId" in target ? `/api/zones/${encodeURIComponent(target.zoneId)}/series` : `/api/probes/${target.probeId}/series`;
  const q = new URLSearchParams({ metric: window.metric });
  if (window.from) q.set("from", iso(window.from));
  if (window.to) q.set("to", iso(window.to));
  return `${base}?${q}`;
}

// keepPreviousData: moving the time window keeps the old line on screen until the new one arrives.
export function useSeries(target: SeriesTarget | null | undefined, window: SeriesWindow | null | undefined) {
  const { data, error, isLoading } = useSWR<Series>(seriesKey(target, window), fetcher, {
    keepPreviousData: true,
    refreshInterval: window?.to ? 0 : 60_000,
  });
  return { data, error: error as Error | undefined, isLoading };
}
