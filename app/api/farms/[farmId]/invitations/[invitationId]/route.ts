import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { revokeInvitation } from "@/lib/server/team/revoke-invitation";

type Ctx = { params: Promise<{ farmId: string; invitationId: string }> };

// DELETE /api/farms/[farmId]/invitations/[invitationId] — owners revoke an open invitation; its link stops working
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { farmId, invitationId } = await params;
  const who = await requireMember({ farmId }, "manage");
  await revokeInvitation(who, invitationId);
  return new Response(null, { status: 204 });
});
