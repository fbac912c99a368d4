import { useCallback } from "react";
import { useSWRConfig } from "swr";
import { feedingsKey, isTodayKey, logbookKey } from "@/lib/client/swr-keys";

/** One refresh for everything a bin's logbook change shows up in: its feedings, its logbook and
 * the Today board (the last feeding and the bin's state). Forms call it after a change. */
export function useBinRefresh(binId: string) {
  const { mutate } = useSWRConfig();
  return useCallback(() => mutate((key) => key === feedingsKey(binId) || key === logbookKey(binId) || isTodayKey(key)), [mutate, binId]);
}
