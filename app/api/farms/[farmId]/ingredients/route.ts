import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { addIngredient } from "@/lib/server/ingredients/add-ingredient";
import { listIngredients } from "@/lib/server/ingredients/list-ingredients";
import { ingredientCreate } from "@/lib/domain/validation/ingredients";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/ingredients — the published library and the farm's own ingredients
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json(await listIngredients(who));
});

// POST /api/farms/[farmId]/ingredients — keepers and owners add their own, with a source
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "log");
  const input = ingredientCreate.parse(await readJson(req));
  return Response.json({ ingredient: await addIngredient(who, input) }, { status: 201 });
});
