import { addIngredient, listIngredients } from "@/db/queries/ingredients";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { ingredientCreate } from "@/lib/domain/validation/ingredients";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/ingredients — the published library and the farm's own ingredients
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json({ ingredients: await listIngredients(who.farmId) });
});

// POST /api/farms/[farmId]/ingredients — keepers and owners add their own, with a source
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "log");
  const input = ingredientCreate.parse(await readJson(req));
  const key = `farm:${input.name.toLowerCase().replace(/[^a-z0-9]+/g, "-")}`;
  const cn = input.cn ?? (input.carbonPct != null && input.nitrogenPct ? input.carbonPct / input.nitrogenPct : null);
  const row = await addIngredient(who.farmId, { ...input, key, cn, sourceStatus: "farm" });
  return Response.json({ ingredient: row }, { status: 201 });
});
