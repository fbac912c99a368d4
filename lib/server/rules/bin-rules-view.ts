import { getBin } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { defaultRuleTable, resolveRules } from "@/lib/domain/rules";
import { getSpecies } from "@/lib/domain/species";
import { binOverrides } from "./bin-overrides";

/** A bin's alert rules as its screen and GET /api/bins/[binId]/rules show them: each kind's defaults
 * for the bin's species, the overrides, and what applies. */
export async function binRulesView(who: Pick<Who, "farmId">, binId: string) {
  const [bin, overrides] = await Promise.all([getBin(binId), binOverrides(who.farmId, binId)]);
  const species = bin ? getSpecies(bin.species) : null;
  if (!species) throw new AppError("not_found", "Not found.");
  return { species: species.id, defaults: defaultRuleTable(species), overrides, effective: resolveRules(species, overrides) };
}
