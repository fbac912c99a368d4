import useSWR from "swr";
import type { LogbookEntry } from "@/db/queries/logbook";
import { fetcher } from "@/lib/client/fetcher";
import { logbookKey } from "@/lib/client/swr-keys";

/** A merged logbook entry as the API sends it (times as ISO strings). */
export type LogbookItem = Omit<LogbookEntry, "at" | "createdAt"> & { at: string; createdAt: string };

// A bin's whole logbook, newest first; null binId waits.
export function useLogbook(binId: string | null) {
  const { data, error, isLoading, mutate } = useSWR<{ entries: LogbookItem[] }>(logbookKey(binId), fetcher, {
    refreshInterval: 60_000,
    keepPreviousData: true,
  });
  return { data, error: error as Error | undefined, isLoading, mutate };
}
