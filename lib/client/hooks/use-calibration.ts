import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { probeCalibrationKey } from "@/lib/client/swr-keys";
import type { CalibrationView } from "@/lib/client/wire";

// One probe's oven-dry samples and fitted line; null probeId waits.
export function useCalibration(probeId: number | null) {
  const { data, error, mutate } = useSWR<CalibrationView>(probeCalibrationKey(probeId), fetcher);
  return { data, error: error as Error | undefined, mutate };
}
