import type { Who } from "@/lib/server/auth/authorize";
import { requireZoneOfBin } from "@/lib/server/zones/zone-of-bin";

type Common = { zoneId?: string | null; at?: Date; notes?: string | null };

/** The part every logbook entry shares: the farm and bin, a zone of that bin or none, when the work
 * was done (now unless back-dated), who logged it, and notes; with the kind's own fields beside it. */
export async function entryRow<T extends Common>(who: Pick<Who, "farmId" | "userId">, binId: string, input: T) {
  const { zoneId = null, at = new Date(), notes = null, ...own } = input;
  await requireZoneOfBin(binId, zoneId);
  return { ...own, farmId: who.farmId, binId, zoneId, at, byUserId: who.userId, notes };
}
