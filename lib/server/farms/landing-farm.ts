import { listMyFarms } from "@/db/queries/users";

export const LAST_FARM_COOKIE = "wormward_farm";

/** Where "/" goes: the farm the person had open last, when they are still on it, else the first by name. */
export async function landingFarm(userId: string, remembered: string | undefined) {
  const farms = await listMyFarms(userId);
  return farms.find((f) => f.id === remembered) ?? farms[0] ?? null;
}
