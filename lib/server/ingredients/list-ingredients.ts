import { listIngredients as listLibrary } from "@/db/queries/ingredients";
import type { Who } from "@/lib/server/auth/authorize";

/** The published library and the farm's own ingredients, the farm's first. */
export async function listIngredients(who: Pick<Who, "farmId">) {
  return { ingredients: await listLibrary(who.farmId) };
}
