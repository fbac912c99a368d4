"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { changeMemberRole, deleteInvitation, removeMember } from "@/db/queries/team";
import { currentUserId, requireMember } from "@/lib/web/session";
import { AppError } from "@/lib/domain/errors";
import { inviteToFarm } from "@/lib/server/team/invitations";
import { ROLE_WORDS } from "@/lib/domain/team-words";
import { inviteForm, removeForm, revokeForm, roleForm } from "@/lib/domain/validation/team";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

const teamPath = (farmId: string) => `/farms/${farmId}/team`;

export const invite = validatedAction(inviteForm, async ({ farmId, email, role }) => {
  const who = await requireMember({ farmId }, "manage");
  await inviteToFarm({ farmId: who.farmId, email, role, invitedBy: who.userId });
  revalidatePath(teamPath(farmId));
  return `Invitation sent to ${email} as ${ROLE_WORDS[role].name.toLowerCase()}.`;
});

export const revoke = validatedAction(revokeForm, async ({ farmId, invitationId }) => {
  const who = await requireMember({ farmId }, "manage");
  if (!(await deleteInvitation(who.farmId, invitationId))) throw new AppError("not_found", "That invitation is no longer open.");
  revalidatePath(teamPath(farmId));
  return "Invitation revoked; its link no longer works.";
});

export const changeRole = validatedAction(roleForm, async ({ farmId, userId, role }) => {
  const who = await requireMember({ farmId }, "manage");
  await changeMemberRole(who.farmId, userId, role);
  revalidatePath(teamPath(farmId));
  return `Now ${ROLE_WORDS[role].name.toLowerCase()}.`;
});

const removeOne = validatedAction(removeForm, async ({ farmId, userId }) => {
  const who = await requireMember({ farmId }, "manage");
  await removeMember(who.farmId, userId);
  revalidatePath(teamPath(farmId));
  return "Removed from the team.";
});

// An owner who leaves can no longer see this page: send them home (outside validatedAction, which catches throws).
export async function remove(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await removeOne(prev, form);
  if (result.ok && form.get("userId") === (await currentUserId())) redirect("/");
  return result;
}
