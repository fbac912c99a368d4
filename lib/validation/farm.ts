import { z } from "zod";

const SPECIES = ["eisenia-fetida", "eisenia-hortensis", "eudrilus-eugeniae", "perionyx-excavatus"] as const;
export const BIN_STYLES = ["flow-through", "tray stack", "tote", "bed", "windrow"] as const;
export const ZONE_KINDS = ["fresh", "working", "curing"] as const;

const name = z.string().trim().min(1, "Give it a name.").max(80, "Keep the name under 80 characters.");
const size = z.number().positive("Must be more than 0.").max(100_000).nullable().optional();

export const farmCreate = z.object({
  name,
  unitSystem: z.enum(["metric", "imperial"]).default("metric"),
  timezone: z.string().trim().min(1).max(64).default("UTC"),
});
export const farmUpdate = farmCreate.partial();

// Zones default by count, ordered from the feeding side to the harvest side.
export function defaultZoneKinds(count: number): (typeof ZONE_KINDS)[number][] {
  if (count === 1) return ["working"];
  if (count === 2) return ["fresh", "curing"];
  return Array.from({ length: count }, (_, i) => (i === 0 ? "fresh" : i === count - 1 ? "curing" : "working"));
}

export const binCreate = z.object({
  name,
  style: z.enum(BIN_STYLES, { message: `Choose one of: ${BIN_STYLES.join(", ")}.` }),
  species: z.enum(SPECIES, { message: `Choose one of: ${SPECIES.join(", ")}.` }),
  lengthCm: size,
  widthCm: size,
  depthCm: size,
  notes: z.string().max(2000).nullable().optional(),
  zoneCount: z.number().int().min(1, "A bin has at least 1 zone.").max(6, "A bin has at most 6 zones.").default(3),
});
export const binUpdate = binCreate.omit({ zoneCount: true }).partial();

export const zoneCreate = z.object({
  kind: z.enum(ZONE_KINDS),
  name: z.string().trim().max(40).nullable().optional(),
});
export const zoneUpdate = z.object({
  kind: z.enum(ZONE_KINDS).optional(),
  name: z.string().trim().max(40).nullable().optional(),
  position: z.number().int().min(1).max(6).optional(),
});
