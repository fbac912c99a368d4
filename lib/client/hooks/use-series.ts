import useSWR from "swr";
import type { Series } from "@/lib/client/wire";
import type { Metric } from "@/lib/domain/vocabulary";
import { fetcher } from "@/lib/client/fetcher";
import { seriesKey, type SeriesTarget, type SeriesWindow } from "@/lib/client/swr-keys";

export type { SeriesTarget } from "@/lib/client/swr-keys";

// keepPreviousData: moving the time window keeps the old line on screen until the new one arrives.
export function useSeries(target: SeriesTarget | null | undefined, window: (SeriesWindow & { metric: Metric }) | null | undefined) {
  const { data, error, isLoading } = useSWR<Series>(seriesKey(target, window), fetcher, {
    keepPreviousData: true,
    refreshInterval: window?.to ? 0 : 60_000,
  });
  return { data, error: error as Error | undefined, isLoading };
}
