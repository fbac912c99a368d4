import { changeMemberRole, removeMember } from "@/db/queries/team";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { AppError, readJson } from "@/lib/web/errors";
import { isUuid, roleChange } from "@/lib/domain/validation/team";

type Ctx = { params: Promise<{ farmId: string; userId: string }> };

const memberId = (id: string) => {
  if (!isUuid(id)) throw new AppError("not_found", "That person is not on this farm's team.");
  return id;
};

// PATCH /api/farms/[farmId]/members/[userId] — owners change a member's role (the last owner stays one: 409)
export const PATCH = route(async (req, { params }: Ctx) => {
  const { farmId, userId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const { role } = roleChange.parse(await readJson(req));
  return Response.json({ member: await changeMemberRole(who.farmId, memberId(userId), role) });
});

// DELETE /api/farms/[farmId]/members/[userId] — owners remove a member (never the last owner: 409)
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { farmId, userId } = await params;
  const who = await requireMember({ farmId }, "manage");
  await removeMember(who.farmId, memberId(userId));
  return new Response(null, { status: 204 });
});
