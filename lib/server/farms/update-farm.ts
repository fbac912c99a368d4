import { updateFarm } from "@/db/queries/farms";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import type { FarmUpdate } from "@/lib/domain/validation/farm";
import { rewordOpenAlerts } from "@/lib/server/alerts/reword-open-alerts";

/** An owner renames the farm or changes its units and time zone; only what is named changes. Open
 * alerts are worded again when the units change, so none keeps the old units. */
export async function updateFarmSettings(who: Pick<Who, "farmId" | "units">, patch: FarmUpdate) {
  const farm = await updateFarm(who.farmId, patch);
  if (!farm) throw new AppError("not_found", "Not found.");
  if (patch.unitSystem && patch.unitSystem !== who.units) await rewordOpenAlerts(farm.id);
  return farm;
}
