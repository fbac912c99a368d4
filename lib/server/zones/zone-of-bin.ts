import { binOfZone } from "@/db/queries/bins";
import { AppError } from "@/lib/domain/errors";

/** A logbook entry may name a zone only of its own bin (or none). */
export async function requireZoneOfBin(binId: string, zoneId: string | null): Promise<void> {
  if (zoneId && (await binOfZone(zoneId)) !== binId) throw new AppError("invalid", "That zone is not in this bin.", "zoneId");
}
