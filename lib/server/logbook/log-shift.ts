import { insertShift } from "@/db/queries/shifts";
import { AppError } from "@/lib/domain/errors";
import type { ShiftCreate } from "@/lib/domain/validation/log-entries";
import type { Who } from "@/lib/server/auth/authorize";
import { requireZoneOfBin } from "@/lib/server/zones/zone-of-bin";
import { entryRow } from "./entry-row";

/** A keeper or owner logs material moved from one zone of the bin to another (the amount, if
 * given, arrives in litres: the schema converted it from the farm's units). With a client key the
 * shift is stored once: a repeat answers the stored shift and `created: false`. */
export async function logShift(who: Pick<Who, "farmId" | "userId">, binId: string, input: ShiftCreate, clientKey?: string) {
  const { toZoneId, volumeL, ...common } = input;
  const row = await entryRow(who, binId, common);
  await requireZoneOfBin(binId, toZoneId).catch(() => {
    throw new AppError("invalid", "That zone is not in this bin.", "toZoneId");
  });
  return insertShift({ ...row, zoneId: input.zoneId, toZoneId, volumeL: volumeL ?? null, clientKey });
}
