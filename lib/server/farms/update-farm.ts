import { updateFarm } from "@/db/queries/farms";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import type { FarmUpdate } from "@/lib/domain/validation/farm";

/** An owner renames the farm or changes its units and time zone; only what is named changes. */
export async function updateFarmSettings(who: Pick<Who, "farmId">, patch: FarmUpdate) {
  const farm = await updateFarm(who.farmId, patch);
  if (!farm) throw new AppError("not_found", "Not found.");
  return farm;
}
