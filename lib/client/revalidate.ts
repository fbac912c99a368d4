import { useCallback } from "react";
import { useRouter } from "next/navigation";
import { useSWRConfig } from "swr";
import { feedingsKey, isTodayKey, logbookKey, todayKey } from "@/lib/client/swr-keys";

// One refresh per aggregate, so a form names what it changed and not every list that shows it. A
// change to one resource alone (a probe, its calibration, a bin's rules) refreshes through the
// `mutate` its hook returns.

/** Everything a bin's logbook change shows up in: its feedings, its logbook and the Today board
 * (the last feeding and the bin's state). */
export function useBinRefresh(binId: string) {
  const { mutate } = useSWRConfig();
  return useCallback(() => mutate((key) => key === feedingsKey(binId) || key === logbookKey(binId) || isTodayKey(key)), [mutate, binId]);
}

/** The farm's Today board, after a bin is added or an alert claimed. */
export function useTodayRefresh(farmId: string) {
  const { mutate } = useSWRConfig();
  return useCallback(() => mutate(todayKey(farmId)), [mutate, farmId]);
}

/** Every SWR key on the page and the server-rendered parts, after entries kept on the phone were sent
 * (they may belong to any bin the page shows). */
export function usePageRefresh() {
  const { mutate } = useSWRConfig();
  const router = useRouter();
  return useCallback(async () => {
    router.refresh();
    await mutate(() => true);
  }, [mutate, router]);
}
