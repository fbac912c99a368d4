import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { changeRole } from "@/lib/server/team/change-role";
import { removeMember } from "@/lib/server/team/remove-member";
import { roleChange } from "@/lib/domain/validation/team";

type Ctx = { params: Promise<{ farmId: string; userId: string }> };

// PATCH /api/farms/[farmId]/members/[userId] — owners change a member's role (the last owner stays one: 409)
export const PATCH = route(async (req, { params }: Ctx) => {
  const { farmId, userId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const { role } = roleChange.parse(await readJson(req));
  return Response.json({ member: await changeRole(who, userId, role) });
});

// DELETE /api/farms/[farmId]/members/[userId] — owners remove a member (never the last owner: 409)
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { farmId, userId } = await params;
  const who = await requireMember({ farmId }, "manage");
  await removeMember(who, userId);
  return new Response(null, { status: 204 });
});
