import { leaveFarmRow } from "@/db/queries/farm-removal";
import { AppError } from "@/lib/domain/errors";

export const LAST_OWNER_CANNOT_LEAVE =
  "You are this farm's last owner, so you cannot leave it yet. First make another member an owner (on the Team page), or delete the farm.";

/** Any member may leave a farm, except its last owner: a farm always has someone who can run it. */
export async function leaveFarm(userId: string, farmId: string) {
  const result = await leaveFarmRow(userId, farmId);
  if (result === "not-member") throw new AppError("not_found", "Not found.");
  if (result === "last-owner") throw new AppError("conflict", LAST_OWNER_CANNOT_LEAVE);
  return { left: farmId };
}
