import useSWR from "swr";
import type { Today } from "@/lib/client/wire";
import { fetcher } from "@/lib/client/fetcher";
import { todayKey } from "@/lib/client/swr-keys";

export function useToday(farmId: string | null) {
  const { data, error, isLoading } = useSWR<Today>(todayKey(farmId), fetcher, {
    refreshInterval: 30_000,
    keepPreviousData: true,
  });
  return { data, error: error as Error | undefined, isLoading };
}
