import { updateBin } from "@/db/queries/bins";
import type { BinPatch } from "@/lib/domain/validation/farm";

/** An owner changes a bin's fields and, when asked, brings it back from the archive in the same step. */
export async function editBin(binId: string, input: BinPatch) {
  return { bin: await updateBin(binId, { ...input.fields, ...(input.bringBack ? { archivedAt: null } : {}) }) };
}
