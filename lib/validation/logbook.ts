import { z } from "zod";

const pct = (what: string) => z.number({ message: `${what} must be a number.` }).min(0, `${what} cannot be below 0 %.`).max(100, `${what} cannot be over 100 %.`);

export const feedingItemInput = z
  .object({
    ingredientId: z.string().uuid().nullable().optional(),
    name: z.string().trim().min(1, "Name the ingredient.").max(80),
    massKg: z.number({ message: "Mass must be a number." }).positive("Mass must be more than 0 kg.").max(10_000),
    moisturePct: pct("Moisture"),
    carbonPct: pct("Carbon").nullable().optional(),
    nitrogenPct: z.number().positive("Nitrogen must be more than 0 %.").max(100).nullable().optional(),
    cn: z.number().positive("C:N must be more than 0.").max(2000).nullable().optional(),
  })
  .refine((i) => i.nitrogenPct != null && (i.carbonPct != null || i.cn != null), {
    message: "Give %N with %C or with C:N, so the mix check can work out C:N.",
    path: ["nitrogenPct"],
  });

export const feedingCreate = z.object({
  zoneId: z.string().uuid().nullable().optional(),
  at: z.coerce.date().optional(),
  notes: z.string().trim().max(2000).nullable().optional(),
  items: z.array(feedingItemInput).min(1, "A feeding has at least one item.").max(30),
});
export type FeedingCreate = z.infer<typeof feedingCreate>;
