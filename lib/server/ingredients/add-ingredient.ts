import { insertIngredient } from "@/db/queries/ingredients";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import type { IngredientCreate } from "@/lib/domain/validation/ingredients";

/** A farm's own ingredient, keyed by its name; C:N from %C and %N when it is not given. */
export async function addIngredient(who: Pick<Who, "farmId">, input: IngredientCreate) {
  const key = `farm:${input.name.toLowerCase().replace(/[^a-z0-9]+/g, "-")}`;
  const cn = input.cn ?? (input.carbonPct != null && input.nitrogenPct ? input.carbonPct / input.nitrogenPct : null);
  const row = await insertIngredient(who.farmId, { ...input, key, cn, sourceStatus: "farm" });
  if (!row) throw new AppError("conflict", "Your farm already has an ingredient with that name.", "name");
  return row;
}
