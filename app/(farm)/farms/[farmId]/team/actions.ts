"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { currentUserId, requireMember } from "@/lib/web/session";
import { changeRole as changeMemberRole } from "@/lib/server/team/change-role";
import { inviteToFarm } from "@/lib/server/team/invite";
import { removeMember } from "@/lib/server/team/remove-member";
import { revokeInvitation } from "@/lib/server/team/revoke-invitation";
import { ROLE_WORDS } from "@/lib/domain/team-words";
import { inviteForm, removeForm, revokeForm, roleForm } from "@/lib/domain/validation/team";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

const teamPath = (farmId: string) => `/farms/${farmId}/team`;

export const invite = validatedAction(inviteForm, async ({ farmId, email, role }) => {
  const who = await requireMember({ farmId }, "manage");
  await inviteToFarm(who, { email, role });
  revalidatePath(teamPath(farmId));
  return `Invitation sent to ${email} as ${ROLE_WORDS[role].name.toLowerCase()}.`;
});

export const revoke = validatedAction(revokeForm, async ({ farmId, invitationId }) => {
  const who = await requireMember({ farmId }, "manage");
  await revokeInvitation(who, invitationId);
  revalidatePath(teamPath(farmId));
  return "Invitation revoked; its link no longer works.";
});

export const changeRole = validatedAction(roleForm, async ({ farmId, userId, role }) => {
  const who = await requireMember({ farmId }, "manage");
  await changeMemberRole(who, userId, role);
  revalidatePath(teamPath(farmId));
  return `Now ${ROLE_WORDS[role].name.toLowerCase()}.`;
});

const removeOne = validatedAction(removeForm, async ({ farmId, userId }) => {
  const who = await requireMember({ farmId }, "manage");
  await removeMember(who, userId);
  revalidatePath(teamPath(farmId));
  return "Removed from the team.";
});

// An owner who leaves can no longer see this page: send them home (outside validatedAction, which catches throws).
export async function remove(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await removeOne(prev, form);
  if (result.ok && form.get("userId") === (await currentUserId())) redirect("/");
  return result;
}
