import { deleteInvitation } from "@/db/queries/team";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { AppError } from "@/lib/domain/errors";
import { isUuid } from "@/lib/domain/validation/team";

type Ctx = { params: Promise<{ farmId: string; invitationId: string }> };

// DELETE /api/farms/[farmId]/invitations/[invitationId] — owners revoke an open invitation; its link stops working
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { farmId, invitationId } = await params;
  const who = await requireMember({ farmId }, "manage");
  if (!isUuid(invitationId) || !(await deleteInvitation(who.farmId, invitationId))) {
    throw new AppError("not_found", "No open invitation with that id on this farm.");
  }
  return new Response(null, { status: 204 });
});
