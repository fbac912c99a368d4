import { createFarm } from "@/db/queries/farms";
import type { FarmCreate } from "@/lib/domain/validation/farm";

/** Anyone signed in may start a farm of their own; they become its owner. */
export async function startFarm(userId: string, input: FarmCreate) {
  return createFarm(userId, input);
}
