import useSWR from "swr";
import type { Metric } from "@/lib/domain/vocabulary";
import type { BinSeries } from "@/lib/client/wire";
import { fetcher } from "@/lib/client/fetcher";
import { binSeriesKey, type SeriesWindow } from "@/lib/client/swr-keys";

// keepPreviousData: a new window or metric keeps the old lines on screen until the new ones arrive.
export function useBinSeries(binId: string | null | undefined, window: SeriesWindow & { metric: Metric }) {
  const { data, error, isLoading } = useSWR<BinSeries>(binSeriesKey(binId, window), fetcher, {
    keepPreviousData: true,
    refreshInterval: window.to ? 0 : 60_000,
  });
  return { data, error: error as Error | undefined, isLoading };
}
