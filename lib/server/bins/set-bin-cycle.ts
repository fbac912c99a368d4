import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { dayWords } from "@/lib/domain/bin-cycle";
import { editBin } from "./edit-bin";

/** The crew sets a bin's feeding interval (null: the farm's) and planned harvest (null: none); the
 * answer says what now holds, in words. */
export async function setBinCycle(who: Pick<Who, "role">, binId: string, fields: { feedingIntervalDays: number | null; plannedHarvestOn: string | null }) {
  const { bin } = await editBin(who, binId, { fields, bringBack: false });
  if (!bin) throw new AppError("not_found", "Not found.");
  const every = bin.feedingIntervalDays ? `Fed every ${bin.feedingIntervalDays} days` : "Fed on the farm's interval";
  const plan = bin.plannedHarvestOn ? `harvest planned for ${dayWords(bin.plannedHarvestOn)} ${bin.plannedHarvestOn.slice(0, 4)}` : "no harvest planned";
  return `Saved. ${every}; ${plan}.`;
}
