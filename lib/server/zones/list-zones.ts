import { getBin } from "@/db/queries/bins";

/** A bin's zones in use, from the feeding side to the harvest side. */
export async function listBinZones(binId: string) {
  return { zones: (await getBin(binId))?.zones ?? [] };
}
