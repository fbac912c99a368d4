import { getBin } from "@/db/queries/bins";

/** One bin with its zones in use. */
export async function readBin(binId: string) {
  return { bin: await getBin(binId) };
}
