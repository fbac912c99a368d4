import { z } from "zod";
import { measured, perUnitSystem, plainText, longText, timeZone } from "./fields";
import type { UnitSystem } from "../units";

import { BIN_STYLES, SPECIES_IDS as SPECIES, UNIT_SYSTEMS, ZONE_KINDS, type ZoneKind } from "../vocabulary";
import { FEEDING_INTERVAL_MAX, FEEDING_INTERVAL_MIN } from "../bin-cycle";

const name = plainText("The name", { min: 1, max: 80, empty: "Give it a name." });
// From a 10 cm worm tower to a 1 km windrow; under 1 cm is a typo, not a bin (common practice).
// Sent in cm, refused in the farm's units ("Width cannot be over 39300 in.").
const size = (what: string, system: UnitSystem) => measured(what, "length", system, { min: 1, max: 100_000 }).nullable().optional();
const unitSystem = z.enum(UNIT_SYSTEMS, { message: "Choose metric or imperial." });
// Days between feedings: daily to twice a year (common practice).
const feedingIntervalDays = z
  .number({ message: "The feeding interval must be a whole number of days." })
  .int("The feeding interval must be a whole number of days.")
  .min(FEEDING_INTERVAL_MIN, `The feeding interval must be at least ${FEEDING_INTERVAL_MIN} day.`)
  .max(FEEDING_INTERVAL_MAX, `The feeding interval must be at most ${FEEDING_INTERVAL_MAX} days.`);
/** A form's text field as a number; empty is left out (undefined), text that is no number stays text for zod to refuse. */
const numberFromText = (v: unknown) =>
  typeof v !== "string" ? v : v.trim() === "" ? undefined : /^-?\d+([.,]\d+)?$/.test(v.trim()) ? Number(v.trim().replace(",", ".")) : v;
const ISO_DAY = /^(\d{4})-(\d{2})-(\d{2})$/;
const realDay = (s: string) => {
  const m = ISO_DAY.exec(s);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const t = new Date(Date.UTC(y, mo - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d;
};
// A planned harvest within a sensible span: from 2000 to five years ahead (a bin takes months to fill).
const plannedHarvestOn = z
  .string({ message: "The planned harvest must be a date, like 2026-12-05." })
  .trim()
  .refine(realDay, "The planned harvest must be a date, like 2026-12-05.")
  .refine((s) => s >= "2000-01-01", "The planned harvest must be in 2000 or later.")
  .refine((s) => Date.parse(`${s}T00:00:00Z`) <= Date.now() + 5 * 366 * 86_400_000, "The planned harvest must be within five years from now.");

// Update schemas list each field without a default: a PATCH changes only what it names.
const farmFields = { name, unitSystem, timezone: timeZone, feedingIntervalDays };
export const farmCreate = z.object({ name, unitSystem: unitSystem.default("metric"), timezone: timeZone.default("UTC") });
export const farmUpdate = z.object(farmFields).partial();
export type FarmCreate = z.output<typeof farmCreate>;
export type FarmUpdate = z.output<typeof farmUpdate>;
/** The settings form: PATCH /api/farms/[farmId]'s schema with every field posted, and the farm's id
 * as a hidden field. */
export const farmForm = farmUpdate
  .required()
  .extend({ farmId: z.string().uuid(), feedingIntervalDays: z.preprocess(numberFromText, feedingIntervalDays.optional()) });
/** The settings page's archive and bring-back buttons: the farm of the page and the bin. */
export const binOfFarmForm = z.object({ farmId: z.string().uuid(), binId: z.string().uuid() });

// Zones default by count, ordered from the feeding side to the harvest side.
export function defaultZoneKinds(count: number): ZoneKind[] {
  if (count === 1) return ["working"];
  if (count === 2) return ["fresh", "curing"];
  return Array.from({ length: count }, (_, i) => (i === 0 ? "fresh" : i === count - 1 ? "curing" : "working"));
}

const binFieldsFor = (system: UnitSystem) => ({
  name,
  style: z.enum(BIN_STYLES, { message: `Choose one of: ${BIN_STYLES.join(", ")}.` }),
  species: z.enum(SPECIES, { message: `Choose one of: ${SPECIES.join(", ")}.` }),
  // The bed's floor (length × width) weighs a feeding against the heat rule's heavy line.
  lengthCm: size("Length", system),
  widthCm: size("Width", system),
  depthCm: size("Depth", system),
  notes: longText("Notes", { max: 2000 }).nullable().optional(),
});
/** A bin has 1 to 6 zones (the design brief's zones of a bin). */
export const MAX_ZONES = 6;
export const binCreateFor = perUnitSystem((system) =>
  z.object({
    ...binFieldsFor(system),
    zoneCount: z.number().int().min(1, "A bin has at least 1 zone.").max(MAX_ZONES, `A bin has at most ${MAX_ZONES} zones.`).default(3),
  }),
);
export const binCreate = binCreateFor("metric");
/** What the crew (owner or keeper) may change of a bin: its feeding interval (null = the farm's)
 * and the day its harvest side is planned to be harvested (null = not planned). */
const binCycleFields = { feedingIntervalDays: feedingIntervalDays.nullable(), plannedHarvestOn: plannedHarvestOn.nullable() };
export const BIN_CYCLE_FIELDS = Object.keys(binCycleFields) as (keyof typeof binCycleFields)[];
export const binUpdateFor = perUnitSystem((system) => z.object({ ...binFieldsFor(system), ...binCycleFields }).partial());
export const binUpdate = binUpdateFor("metric");
/** The bin page's cycle form: both fields posted, empty meaning "the farm's" and "not planned". */
export const binCycleForm = z.object({
  binId: z.string().uuid(),
  feedingIntervalDays: z.preprocess((v) => numberFromText(v) ?? null, binCycleFields.feedingIntervalDays),
  plannedHarvestOn: z.preprocess((v) => (typeof v === "string" && v.trim() === "" ? null : v), binCycleFields.plannedHarvestOn),
});
/** PATCH /api/bins/[binId]: the fields to change; {"archived": false} brings an archived bin back,
 * any other value of it is ignored as an unknown key would be. */
export const binPatchFor = perUnitSystem((system) =>
  binUpdateFor(system)
    .extend({ archived: z.unknown().optional() })
    .transform(({ archived, ...fields }) => ({ fields, bringBack: archived === false })),
);
export const binPatch = binPatchFor("metric");
/** ?archived=1 lists archived bins too. */
export const binListQuery = z.object({ archived: z.string().optional() }).transform((q) => ({ includeArchived: q.archived === "1" }));
export type BinCreate = z.output<typeof binCreate>;
/** The bin's size alone (the Size form): lengths in cm, refused in the farm's units. */
export const binSizeFor = perUnitSystem((system) =>
  z.object({ lengthCm: size("Length", system), widthCm: size("Width", system), depthCm: size("Depth", system) }),
);
export type BinPatch = z.output<typeof binPatch>;

const zoneName = plainText("The zone name", { max: 40 }).nullable().optional();
export const zoneCreate = z.object({ kind: z.enum(ZONE_KINDS), name: zoneName });
export const zoneUpdate = z.object({
  kind: z.enum(ZONE_KINDS).optional(),
  name: zoneName,
  position: z.number().int().min(1).max(MAX_ZONES).optional(),
});
export type ZoneCreate = z.output<typeof zoneCreate>;
export type ZoneUpdate = z.output<typeof zoneUpdate>;
