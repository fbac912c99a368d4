import { updateQuietHours } from "@/db/queries/push";
import { getUser } from "@/db/queries/users";
import { hasChanges } from "@/db/queries/patch";
import { AppError } from "@/lib/domain/errors";
import type { MeUpdate } from "@/lib/domain/validation/alerts";

/** A person's own quiet hours and time zone: only what is named changes, and quiet hours keep
 * both ends or neither once the named end is laid over the stored one. */
export async function updateMe(userId: string, patch: MeUpdate) {
  const user = await getUser(userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  const from = patch.quietFrom === undefined ? user.quietFrom : patch.quietFrom;
  const to = patch.quietTo === undefined ? user.quietTo : patch.quietTo;
  if ((from == null) !== (to == null)) {
    const field = patch.quietFrom === undefined ? "quietTo" : "quietFrom";
    throw new AppError("invalid", "Give both ends of quiet hours, or neither.", field);
  }
  if (!hasChanges(patch)) return { quietFrom: user.quietFrom, quietTo: user.quietTo, timezone: user.timezone };
  return updateQuietHours(userId, patch);
}
