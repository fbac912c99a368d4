import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { listMembers } from "@/lib/server/team/list-members";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/members — every member sees names and roles; owners also see e-mails
// and the invitations still open
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json(await listMembers(who));
});
