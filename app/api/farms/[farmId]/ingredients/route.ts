import { z } from "zod";
import { addIngredient, listIngredients } from "@/db/queries/ingredients";
import { route } from "@/lib/api/route";
import { requireMember } from "@/lib/auth/session";
import { readJson } from "@/lib/errors";

type Ctx = { params: Promise<{ farmId: string }> };

const ingredientCreate = z
  .object({
    name: z.string().trim().min(1, "Name it.").max(80),
    kind: z.enum(["bedding", "feedstock"]),
    moisturePct: z.number().min(0, "Moisture cannot be below 0 %.").max(100, "Moisture cannot be over 100 %."),
    carbonPct: z.number().min(0).max(100).nullable().optional(),
    nitrogenPct: z.number().positive("Nitrogen must be more than 0 %.").max(100).nullable().optional(),
    cn: z.number().positive("C:N must be more than 0.").max(2000).nullable().optional(),
    source: z.string().trim().min(1, "Say where the values come from (a lab report, a table, your own measurement).").max(300),
  })
  .refine((v) => v.nitrogenPct == null || v.carbonPct != null || v.cn != null, { message: "With %N give %C or C:N.", path: ["carbonPct"] });

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
