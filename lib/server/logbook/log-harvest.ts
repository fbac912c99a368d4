import { insertHarvest } from "@/db/queries/logbook";
import type { Who } from "@/lib/server/auth/authorize";
import type { HarvestCreate } from "@/lib/domain/validation/log-entries";
import { entryRow } from "./entry-row";

/** A keeper or owner logs castings harvested from the bin; a clientKey the farm used before answers the entry stored
 * then (`created` false). */
export async function logHarvest(who: Pick<Who, "farmId" | "userId">, binId: string, input: HarvestCreate & { clientKey?: string }) {
  const { row, created } = await insertHarvest(await entryRow(who, binId, input));
  return { answer: { harvest: row }, created };
}
