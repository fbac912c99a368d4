import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { probesKey } from "@/lib/client/swr-keys";
import type { ProbeList } from "@/lib/client/wire";

// The farm's probes, refreshed every 30 s so "reporting" and "silent since" stay current.
export function useProbes(farmId: string | null) {
  const { data, error, mutate } = useSWR<ProbeList>(probesKey(farmId), fetcher, { refreshInterval: 30_000 });
  return { data, error: error as Error | undefined, mutate };
}
