import { updateBin } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { roleAllows } from "@/lib/domain/roles";
import { BIN_CYCLE_FIELDS, type BinPatch } from "@/lib/domain/validation/farm";

/** A bin's fields change, and an archived bin comes back when asked, in one step. The crew keeps
 * the bin's cycle (feeding interval, planned harvest); everything else is an owner's to change, so
 * a keeper naming any other field is refused before anything changes. */
export async function editBin(who: Pick<Who, "role">, binId: string, input: BinPatch) {
  const others = Object.keys(input.fields).filter((k) => !(BIN_CYCLE_FIELDS as string[]).includes(k));
  if (!roleAllows(who.role, "manage") && (others.length > 0 || input.bringBack)) {
    throw new AppError("forbidden", `A ${who.role} can change only a bin's feeding interval and planned harvest; ask an owner of the farm.`);
  }
  return { bin: await updateBin(binId, { ...input.fields, ...(input.bringBack ? { archivedAt: null } : {}) }) };
}
