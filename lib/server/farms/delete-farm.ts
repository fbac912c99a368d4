import { deleteFarmRows, farmName } from "@/db/queries/farm-removal";
import { AppError } from "@/lib/domain/errors";
import type { Who } from "@/lib/server/auth/authorize";

/** An owner deletes a farm and everything of it, after typing its name again. */
export async function deleteFarm(who: Who, confirm: string) {
  if (who.role !== "owner") throw new AppError("forbidden", "Only an owner can delete the farm.");
  const name = await farmName(who.farmId);
  if (name === null) throw new AppError("not_found", "Not found.");
  if (confirm.trim() !== name.trim()) {
    throw new AppError("invalid", `Type the farm's name, ${name}, exactly as shown to delete it.`, "confirm");
  }
  await deleteFarmRows(who.farmId);
  return { deleted: who.farmId };
}
