import { listBins } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { roleAllows } from "@/lib/domain/roles";
import { readFarm } from "./read-farm";

/** What the settings page shows: the farm, and to those who may change it every bin, archived ones too. */
export async function farmSettingsView(who: Who) {
  const { farm } = await readFarm(who);
  if (!roleAllows(who.role, "manage")) return { farm, bins: null };
  return { farm, bins: await listBins(who.farmId, { includeArchived: true }) };
}
