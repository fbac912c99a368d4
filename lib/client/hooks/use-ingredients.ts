import useSWR from "swr";
import type { listIngredients } from "@/db/queries/ingredients";
import { fetcher } from "@/lib/client/fetcher";
import { ingredientsKey } from "@/lib/client/swr-keys";

type Row = Awaited<ReturnType<typeof listIngredients>>[number];
/** A library or farm ingredient as the API sends it. */
export type IngredientRow = Omit<Row, "createdAt"> & { createdAt: string };

// The published library plus the farm's own; it changes rarely, so no polling.
export function useIngredients(farmId: string | null) {
  const { data, error, isLoading } = useSWR<{ ingredients: IngredientRow[] }>(ingredientsKey(farmId), fetcher, {
    revalidateOnFocus: false,
  });
  return { data, error: error as Error | undefined, isLoading };
}
