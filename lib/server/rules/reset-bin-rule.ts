import { deleteBinRule } from "@/db/queries/rules";
import type { AlertKind } from "@/lib/domain/vocabulary";
import type { Who } from "@/lib/server/auth/authorize";

/** An owner takes back this bin's override of one kind: the farm's rule or the species defaults apply again. */
export async function resetBinRule(who: Pick<Who, "farmId">, binId: string, kind: AlertKind) {
  return { removed: await deleteBinRule(who.farmId, binId, kind) };
}
