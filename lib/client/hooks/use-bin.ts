import useSWR from "swr";
import { fetcher } from "@/lib/client/fetcher";

/** GET /api/bins/[binId]: one bin with its zones (lib/server/bins/read-bin.ts). */
export const binKey = (binId: string | null) => (binId ? `/api/bins/${binId}` : null);

export type BinSize = { lengthCm: number | null; widthCm: number | null; depthCm: number | null; feedingIntervalDays: number | null };

// The feeding form weighs a load against the bin's floor; a form given the size by its page passes null.
export function useBin(binId: string | null) {
  const { data, error, isLoading } = useSWR<{ bin: BinSize | null }>(binKey(binId), fetcher, { revalidateOnFocus: false });
  return { data, error: error as Error | undefined, isLoading };
}
