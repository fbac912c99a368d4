import { z } from "zod";
import { finiteNumber, loggedAt, longText, measured, perUnitSystem, quantity } from "./fields";
import { UNIT_LABELS, temperatureForDisplay, type UnitSystem } from "../units";

// One rule for the time of every logbook entry (feedings too): back-dated is fine, the future is not.
export const logCommon = {
  zoneId: z.string().uuid("Pick a zone of this bin.").nullable().optional(),
  at: loggedAt.optional(),
  notes: longText("Notes", { max: 2000 }).nullable().optional(),
};

// Amounts are sent metric (litres, massKg) and refused in the farm's units, so an imperial form
// hears "cannot be over 2640 US gal". The `…For(system)` builders are what the API parses with.
// A cup (0.01 L, 10 mL) is the least anyone waters with; 10 m³ is a large windrow's soaking (common practice).
export const wateringCreateFor = perUnitSystem((system: UnitSystem) =>
  z.object({ ...logCommon, litres: measured("Water", "volume", system, { min: 0.01, max: 10_000 }) }),
);
// Kitchen scales read to 1 g; 100 t is far beyond a farm's single harvest (common practice).
export const harvestCreateFor = perUnitSystem((system: UnitSystem) =>
  z.object({ ...logCommon, massKg: measured("Mass", "mass", system, { min: 0.001, max: 100_000, minWords: "1 g" }) }),
);
// A shift moves material from one zone of the bin toward another (usually toward the harvest side).
// The amount is an optional estimate: a scoop (0.1 L) to a large bed's whole zone, 10 m³ (common practice).
export const shiftCreateFor = perUnitSystem((system: UnitSystem) =>
  z
    .object({
      zoneId: z.string({ message: "Pick the zone the material came from." }).uuid("Pick the zone the material came from."),
      toZoneId: z.string({ message: "Pick the zone it went to." }).uuid("Pick the zone it went to."),
      at: logCommon.at,
      notes: logCommon.notes,
      volumeL: measured("Moved", "volume", system, { min: 0.1, max: 10_000 }).nullable().optional(),
    })
    .refine((s) => s.zoneId !== s.toZoneId, { message: "Pick two different zones: material moves from one to another.", path: ["toZoneId"] }),
);
export const shiftCreate = shiftCreateFor("metric");
export type ShiftCreate = z.output<typeof shiftCreate>;
export const wateringCreate = wateringCreateFor("metric");
export const harvestCreate = harvestCreateFor("metric");
export const noteCreate = z.object({ ...logCommon, text: longText("The note", { min: 1, max: 4000, empty: "Write the note." }) });
export type WateringCreate = z.output<typeof wateringCreate>;
export type HarvestCreate = z.output<typeof harvestCreate>;
export type NoteCreate = z.output<typeof noteCreate>;
/** ?limit= for one kind's list (waterings, harvests, notes), newest first. */
export const logEntryListQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(50) });
export type LogEntryListQuery = z.output<typeof logEntryListQuery>;

// Oven-dry samples are weighed on a lab or kitchen balance: 1 mg (0.001 g) resolution at best.
const grams = (what: string, zero: boolean) => quantity(what, "g", { min: 0.001, max: 100_000, zero });
// The oven's limits are said in the farm's units; the field is sent in °C (ovenTempC).
const ovenLimit = (c: number, system: UnitSystem) => `${Math.round(temperatureForDisplay(c, system))} ${UNIT_LABELS[system].temperature}`;
export const sampleCreateFor = perUnitSystem((system: UnitSystem) =>
  z.object({
    wetMassG: grams("Wet mass", false),
    dryMassG: grams("Dry mass", true),
    tareG: grams("Container mass", true).optional(),
    // Ovens for moisture run 60–110 °C (TMECC 70 ± 5, ASTM D2216 110 ± 5); outside that, likely a typo.
    ovenTempC: z
      .number({ message: "Oven temperature must be a number." })
      .min(40, `Oven temperature below ${ovenLimit(40, system)} will not dry the sample.`)
      .max(130, `Oven temperature above ${ovenLimit(130, system)} burns organic matter.`)
      .nullable()
      .optional(),
    // A raw count from the probe's ADC or capacitance timer; 32-bit counters are the widest in use.
    rawReading: finiteNumber("Raw reading", { min: -4_294_967_296, max: 4_294_967_296 }).nullable().optional(),
    at: loggedAt.optional(),
    notes: logCommon.notes,
  }),
);
export const sampleCreate = sampleCreateFor("metric");
export type SampleCreate = z.infer<typeof sampleCreate>;
