import { getBin } from "@/db/queries/bins";
import { getFarm } from "@/db/queries/farms";
import type { Who } from "@/lib/server/auth/authorize";

/** The bin with its zones and the farm's name and display settings, for a bin's screens; null when either is gone. */
export async function binWithFarm(who: Pick<Who, "farmId">, binId: string) {
  const [bin, farm] = await Promise.all([getBin(binId), getFarm(who.farmId)]);
  if (!bin || !farm) return null;
  return { bin, farm: { name: farm.name, unitSystem: farm.unitSystem, timezone: farm.timezone, feedingIntervalDays: farm.feedingIntervalDays } };
}
