import { z } from "zod";
import { measured, perUnitSystem, plainText, longText, timeZone } from "./fields";
import type { UnitSystem } from "../units";

import { BIN_STYLES, SPECIES_IDS as SPECIES, UNIT_SYSTEMS, ZONE_KINDS, type ZoneKind } from "../vocabulary";

const name = plainText("The name", { min: 1, max: 80, empty: "Give it a name." });
// From a 10 cm worm tower to a 1 km windrow; under 1 cm is a typo, not a bin (common practice).
// Sent in cm, refused in the farm's units ("Width cannot be over 39300 in.").
const size = (what: string, system: UnitSystem) => measured(what, "length", system, { min: 1, max: 100_000 }).nullable().optional();
const unitSystem = z.enum(UNIT_SYSTEMS, { message: "Choose metric or imperial." });

// Update schemas list each field without a default: a PATCH changes only what it names.
const farmFields = { name, unitSystem, timezone: timeZone };
export const farmCreate = z.object({ name, unitSystem: unitSystem.default("metric"), timezone: timeZone.default("UTC") });
export const farmUpdate = z.object(farmFields).partial();
export type FarmCreate = z.output<typeof farmCreate>;
export type FarmUpdate = z.output<typeof farmUpdate>;
/** The settings form: PATCH /api/farms/[farmId]'s schema with every field posted, and the farm's id
 * as a hidden field. */
export const farmForm = farmUpdate.required().extend({ farmId: z.string().uuid() });
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
export const binUpdateFor = perUnitSystem((system) => z.object(binFieldsFor(system)).partial());
export const binUpdate = binUpdateFor("metric");
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
