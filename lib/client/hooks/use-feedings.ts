import useSWR from "swr";
import type { FeedingEntry } from "@/db/queries/feedings";
import { fetcher } from "@/lib/client/fetcher";
import { feedingsKey } from "@/lib/client/swr-keys";

/** A logbook feeding as the API sends it (times as ISO strings). */
export type Feeding = Omit<FeedingEntry, "at" | "createdAt"> & { at: string; createdAt: string };
export type FeedingItem = Feeding["items"][number];

// A bin's feedings, newest first, with items and who logged them; null binId waits.
export function useFeedings(binId: string | null) {
  const { data, error, isLoading } = useSWR<{ feedings: Feeding[] }>(feedingsKey(binId), fetcher, {
    refreshInterval: 60_000,
    keepPreviousData: true,
  });
  return { data, error: error as Error | undefined, isLoading };
}
