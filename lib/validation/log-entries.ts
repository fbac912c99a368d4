import { z } from "zod";

// `at` may be back-dated (logged after the work) but not in the future; a minute of slack for phone clocks.
const at = z.coerce
  .date({ message: "at must be a date and time." })
  .refine((d) => d.getTime() <= Date.now() + 60_000, "A logbook entry cannot be in the future.")
  .optional();
const common = {
  zoneId: z.string().uuid("Pick a zone of this bin.").nullable().optional(),
  at,
  notes: z.string().trim().max(2000).nullable().optional(),
};

export const wateringCreate = z.object({ ...common, litres: z.number({ message: "Water must be a number." }).positive("Water must be more than 0 L.").max(10_000) });
export const harvestCreate = z.object({ ...common, massKg: z.number({ message: "Mass must be a number." }).positive("Mass must be more than 0 kg.").max(100_000) });
export const noteCreate = z.object({ ...common, text: z.string({ message: "Write the note." }).trim().min(1, "Write the note.").max(4000) });

const grams = (what: string) => z.number({ message: `${what} must be a number.` }).nonnegative(`${what} cannot be negative.`).max(100_000);
export const sampleCreate = z.object({
  wetMassG: grams("Wet mass").positive("Wet mass must be more than 0 g."),
  dryMassG: grams("Dry mass"),
  tareG: grams("Container mass").optional(),
  // Ovens for moisture run 60–110 °C (TMECC 70 ± 5, ASTM D2216 110 ± 5); outside that, likely a typo.
  ovenTempC: z.number({ message: "Oven temperature must be a number." }).min(40, "Oven temperature below 40 °C will not dry the sample.").max(130, "Oven temperature above 130 °C burns organic matter.").nullable().optional(),
  rawReading: z.number({ message: "Raw reading must be a number." }).finite().nullable().optional(),
  at,
  notes: z.string().trim().max(2000).nullable().optional(),
});
export type SampleCreate = z.infer<typeof sampleCreate>;
