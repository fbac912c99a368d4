import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { feedingsKey } from "@/lib/client/swr-keys";
import type { Feeding } from "@/lib/client/wire";

// A bin's feedings, newest first, with items and who logged them; null binId waits.
export function useFeedings(binId: string | null) {
  const { data, error, isLoading } = useSWR<{ feedings: Feeding[] }>(feedingsKey(binId), fetcher, {
    refreshInterval: 60_000,
    keepPreviousData: true,
  });
  return { data, error: error as Error | undefined, isLoading };
}
