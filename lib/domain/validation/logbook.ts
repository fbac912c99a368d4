import { z } from "zod";
import { logCommon } from "./log-entries";
import { instant, measured, percent, perUnitSystem, plainText, quantity } from "./fields";
import type { UnitSystem } from "../units";

/** One item of a feeding; its mass is refused in the farm's units (sent in kg). */
export const feedingItemInputFor = (system: UnitSystem) =>
  z
    .object({
      ingredientId: z.string().uuid("Choose an ingredient from the list.").nullable().optional(),
      name: plainText("The ingredient name", { min: 1, max: 80, empty: "Name the ingredient." }),
      // A handful (1 g) to a truckload (10 t) per item.
      massKg: measured("Mass", "mass", system, { min: 0.001, max: 10_000, minWords: "1 g" }),
      moisturePct: percent("Moisture"),
      carbonPct: percent("Carbon").nullable().optional(),
      nitrogenPct: percent("Nitrogen", { positive: true }).nullable().optional(),
      // C:N of feedstocks and beddings runs from under 10 to several hundred (the library in lib/domain/ingredients.ts, from
      // NRAES-54 App. A); 2000 leaves room for odd woody material, 0.1 refuses values no material has.
      cn: quantity("C:N", "", { min: 0.1, max: 2000 }).nullable().optional(),
    })
    .refine((i) => i.nitrogenPct != null && (i.carbonPct != null || i.cn != null), {
      message: "Give %N with %C or with C:N, so the mix check can work out C:N.",
      path: ["nitrogenPct"],
    });

export const feedingItemInput = feedingItemInputFor("metric");

export const feedingCreateFor = perUnitSystem((system: UnitSystem) =>
  z.object({
    zoneId: logCommon.zoneId,
    at: logCommon.at,
    notes: logCommon.notes,
    items: z.array(feedingItemInputFor(system)).min(1, "A feeding has at least one item.").max(30),
  }),
);
export const feedingCreate = feedingCreateFor("metric");
export type FeedingCreate = z.infer<typeof feedingCreate>;

// ?since=&limit= for a bin's feedings (chart marks): any instant from 2000 on.
export const feedingListQuery = z.object({
  since: instant("since").optional(),
  limit: z.coerce.number().int().min(1).max(500).default(50),
});
export type FeedingListQuery = z.output<typeof feedingListQuery>;

/** ?limit= for a bin's whole logbook, every kind merged. */
export const logbookQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) });
export type LogbookQuery = z.output<typeof logbookQuery>;
