import { updateZone } from "@/db/queries/bins";
import { AppError } from "@/lib/domain/errors";
import type { ZoneUpdate } from "@/lib/domain/validation/farm";

/** An owner renames a zone, changes its kind, or moves it to a free position of its bin. */
export async function editZone(zoneId: string, input: ZoneUpdate) {
  const r = await updateZone(zoneId, input);
  if ("refused" in r) throw new AppError("conflict", "Another zone of this bin already has that position.", "position");
  return { zone: r.changed };
}
