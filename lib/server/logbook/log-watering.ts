import { insertWatering } from "@/db/queries/logbook";
import type { Who } from "@/lib/server/auth/authorize";
import type { WateringCreate } from "@/lib/domain/validation/log-entries";
import { entryRow } from "./entry-row";

/** A keeper or owner logs water given to the bin; a clientKey the farm used before answers the entry stored
 * then (`created` false). */
export async function logWatering(who: Pick<Who, "farmId" | "userId">, binId: string, input: WateringCreate & { clientKey?: string }) {
  const { row, created } = await insertWatering(await entryRow(who, binId, input));
  return { answer: { watering: row }, created };
}
