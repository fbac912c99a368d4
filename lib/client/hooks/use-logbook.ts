import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { farmLogbookKey, logbookKey } from "@/lib/client/swr-keys";
import type { FarmLogbookPage, LogbookItem } from "@/lib/client/wire";

// A bin's whole logbook, newest first; null binId waits.
export function useLogbook(binId: string | null) {
  const { data, error, isLoading, mutate } = useSWR<{ entries: LogbookItem[] }>(logbookKey(binId), fetcher, {
    refreshInterval: 60_000,
    keepPreviousData: true,
  });
  return { data, error: error as Error | undefined, isLoading, mutate };
}

// One page of the farm's logbook with the filters of the page's URL (a query string); null farmId waits.
export function useFarmLogbook(farmId: string | null, search = "") {
  const { data, error, isLoading, mutate } = useSWR<FarmLogbookPage>(farmLogbookKey(farmId, search), fetcher, {
    refreshInterval: 60_000,
    keepPreviousData: true,
  });
  return { data, error: error as Error | undefined, isLoading, mutate };
}
