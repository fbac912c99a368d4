import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { binRulesKey } from "@/lib/client/swr-keys";

// A bin's alert rules (defaults, overrides, what applies), primed by the rules page.
export function useBinRules<T>(binId: string, initial: T) {
  const { data, error, mutate } = useSWR<T>(binRulesKey(binId), fetcher, { fallbackData: initial });
  return { data, error: error as Error | undefined, mutate };
}
