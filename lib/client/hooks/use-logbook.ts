import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { logbookKey } from "@/lib/client/swr-keys";
import type { LogbookItem } from "@/lib/client/wire";

// A bin's whole logbook, newest first; null binId waits.
export function useLogbook(binId: string | null) {
  const { data, error, isLoading, mutate } = useSWR<{ entries: LogbookItem[] }>(logbookKey(binId), fetcher, {
    refreshInterval: 60_000,
    keepPreviousData: true,
  });
  return { data, error: error as Error | undefined, isLoading, mutate };
}
