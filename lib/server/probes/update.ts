import { patchProbe } from "@/db/queries/probes";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import type { ProbeUpdate } from "@/lib/domain/validation/probes";
import { requireZoneOfFarm } from "./zone-of-farm";

/** Moves a probe to another zone of the farm, relabels it, changes its metrics or interval, archives or restores it. */
export async function updateProbe(who: Pick<Who, "farmId">, probeId: number, input: ProbeUpdate) {
  const { archived, ...patch } = input;
  await requireZoneOfFarm(who.farmId, patch.zoneId);
  const probe = await patchProbe(who.farmId, probeId, { ...patch, ...(archived === undefined ? {} : { archivedAt: archived ? new Date() : null }) });
  if (!probe) throw new AppError("not_found", "Not found.");
  return { probe };
}
