import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { probeHealthKey } from "@/lib/client/swr-keys";
import type { ProbeHealth } from "@/lib/client/wire";

// One probe's health. Every 5 s while it has sent no reading, so the page turns live without a
// reload when the first one arrives; every 30 s after that, as the probe list does.
export function useProbeHealth(probeId: number | null) {
  const { data, error } = useSWR<ProbeHealth>(probeHealthKey(probeId), fetcher, {
    refreshInterval: (latest) => (latest && latest.presence.state !== "no-reading-yet" ? 30_000 : 5_000),
  });
  return { data, error: error as Error | undefined, isLoading: !data && !error };
}
