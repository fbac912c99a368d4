import { zoneFarm } from "@/db/queries/probes";
import { AppError } from "@/lib/domain/errors";

/** A probe may be placed only in a zone of its own farm (or in none). */
export async function requireZoneOfFarm(farmId: string, zoneId: string | null | undefined): Promise<void> {
  if (zoneId && (await zoneFarm(zoneId)) !== farmId) throw new AppError("invalid", "That zone is not on this farm.", "zoneId");
}
