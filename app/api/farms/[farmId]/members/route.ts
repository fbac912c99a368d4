import { listPendingInvitations, listTeam } from "@/db/queries/team";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/members — every member sees names and roles; owners also see e-mails
// and the invitations still open
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const owner = who.role === "owner";
  const [team, pending] = await Promise.all([listTeam(who.farmId), owner ? listPendingInvitations(who.farmId) : null]);
  return Response.json({
    members: team.map((m) => ({ userId: m.userId, name: m.name, role: m.role, joinedAt: m.joinedAt, ...(owner ? { email: m.email } : {}) })),
    ...(pending ? { invitations: pending } : {}),
  });
});
