import { listRulesForBin } from "@/db/queries/rules";
import { overridesFromRuleRows } from "@/lib/domain/rules";

/** What the farm's owners changed for this bin: the farm-wide rows with the bin's own laid over them. */
export async function binOverrides(farmId: string, binId: string) {
  return overridesFromRuleRows(await listRulesForBin(farmId, binId), binId);
}
