import { listBins } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";

/** The farm's bins with their zones, by name; archived ones only when asked for. */
export async function listFarmBins(who: Pick<Who, "farmId">, q: { includeArchived: boolean }) {
  return { bins: await listBins(who.farmId, q) };
}
