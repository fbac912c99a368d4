import { z } from "zod";
import { percent, plainText, quantity } from "./fields";
import type { IngredientKind } from "../vocabulary";

// A farm's own ingredient, with where its numbers come from.
export const ingredientCreate = z
  .object({
    name: plainText("The name", { min: 1, max: 80, empty: "Name it." }),
    kind: z.enum(["bedding", "feedstock"] satisfies IngredientKind[], { message: "Choose bedding or feedstock." }),
    moisturePct: percent("Moisture"),
    carbonPct: percent("Carbon").nullable().optional(),
    nitrogenPct: percent("Nitrogen", { positive: true }).nullable().optional(),
    cn: quantity("C:N", "", { min: 0.1, max: 2000 }).nullable().optional(),
    source: plainText("The source", { min: 1, max: 300, empty: "Say where the values come from (a lab report, a table, your own measurement)." }),
  })
  .refine((v) => v.nitrogenPct == null || v.carbonPct != null || v.cn != null, { message: "With %N give %C or C:N.", path: ["carbonPct"] });
export type IngredientCreate = z.infer<typeof ingredientCreate>;
