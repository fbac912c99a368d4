import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";
import { ingredientsKey } from "@/lib/client/swr-keys";
import type { IngredientRow } from "@/lib/client/wire";

// The published library plus the farm's own; it changes rarely, so no polling.
export function useIngredients(farmId: string | null) {
  const { data, error, isLoading } = useSWR<{ ingredients: IngredientRow[] }>(ingredientsKey(farmId), fetcher, {
    revalidateOnFocus: false,
  });
  return { data, error: error as Error | undefined, isLoading };
}
