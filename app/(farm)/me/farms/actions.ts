"use server";

import { redirect } from "next/navigation";
import { deleteFarm } from "@/lib/server/farms/delete-farm";
import { leaveFarm } from "@/lib/server/farms/leave-farm";
import { deleteFarmForm, leaveFarmForm } from "@/lib/domain/validation/sign-up";
import { requireMember, requireUser } from "@/lib/web/session";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

// Leaving is a person's own membership: any role may, except the last owner (the use case says so).
const leave = validatedAction(leaveFarmForm, async ({ farmId }) => {
  await leaveFarm(await requireUser(), farmId);
  return "/me/farms?notice=left";
});

// The farm's own form goes with the farm, so the page says it instead.
export async function leaveFarmAction(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await leave(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}

const remove = validatedAction(deleteFarmForm, async ({ farmId, confirm }) => {
  await deleteFarm(await requireMember({ farmId }, "manage"), confirm);
  return "/me/farms";
});

export async function deleteFarmAction(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await remove(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}
