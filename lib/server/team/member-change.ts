import type { MembershipChange } from "@/db/queries/team";
import { AppError } from "@/lib/domain/errors";
import { isUuid } from "@/lib/domain/validation/team";

const NOT_ON_TEAM = "That person is not on this farm's team.";

/** Runs a role change or removal and says why it was refused: someone not on the team (a
 * malformed id too) is 404, the farm's last owner 409. */
export async function memberChanged(userId: string, change: (userId: string) => Promise<MembershipChange>, lastOwner: string) {
  if (!isUuid(userId)) throw new AppError("not_found", NOT_ON_TEAM);
  const r = await change(userId);
  if ("changed" in r) return r.changed;
  if (r.refused === "not_member") throw new AppError("not_found", NOT_ON_TEAM);
  throw new AppError("conflict", `This is the farm's last owner and ${lastOwner}. Make someone else an owner first.`);
}
