import { deleteInvitation } from "@/db/queries/team";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { isUuid } from "@/lib/domain/validation/team";

/** An owner revokes an open invitation; its link stops working. Another farm's id, a taken one and
 * a malformed one get the same 404. */
export async function revokeInvitation(who: Pick<Who, "farmId">, invitationId: string) {
  if (!isUuid(invitationId) || !(await deleteInvitation(who.farmId, invitationId))) {
    throw new AppError("not_found", "No open invitation with that id on this farm.");
  }
}
