import { listFarmProbesWithStatus } from "@/db/queries/probes";
import type { Who } from "@/lib/server/auth/authorize";

/** Every probe of the farm with its zone, last seen, battery, signal and whether it is online. */
export async function listProbes(who: Pick<Who, "farmId">) {
  return { probes: await listFarmProbesWithStatus(who.farmId) };
}
