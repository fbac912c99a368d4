import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { binRulesKey } from "@/lib/client/swr-keys";
import type { BinRules } from "@/lib/client/wire";

// A bin's alert rules (defaults, overrides, what applies), primed by the rules page.
export function useBinRules(binId: string, initial: BinRules) {
  const { data, error, mutate } = useSWR<BinRules>(binRulesKey(binId), fetcher, { fallbackData: initial });
  return { data, error: error as Error | undefined, mutate };
}
