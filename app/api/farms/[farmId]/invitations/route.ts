import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { inviteToFarm } from "@/lib/server/team/invite";
import { listInvitations } from "@/lib/server/team/list-invitations";
import { invitationCreate } from "@/lib/domain/validation/team";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/invitations — owners see the invitations still open
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  return Response.json(await listInvitations(who));
});

// POST /api/farms/[farmId]/invitations — owners invite someone by e-mail with a role; the link is mailed
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const input = invitationCreate.parse(await readJson(req));
  return Response.json({ invitation: await inviteToFarm(who, input) }, { status: 201 });
});
