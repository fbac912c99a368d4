import { addZone } from "@/db/queries/bins";
import { AppError } from "@/lib/domain/errors";
import { MAX_ZONES, type ZoneCreate } from "@/lib/domain/validation/farm";

/** An owner adds a zone at the harvest end of the bin, while it has fewer than six in use. */
export async function addBinZone(binId: string, input: ZoneCreate) {
  const zone = await addZone(binId, input, MAX_ZONES);
  if (!zone) throw new AppError("invalid", `A bin has at most ${MAX_ZONES} zones.`, "kind");
  return { zone };
}
