"use server";

import { redirect } from "next/navigation";
import { revalidatePath } from "next/cache";
import { deleteFarm } from "@/lib/server/farms/delete-farm";
import { leaveFarm } from "@/lib/server/farms/leave-farm";
import { deleteFarmForm, leaveFarmForm } from "@/lib/domain/validation/sign-up";
import { requireMember, requireUser } from "@/lib/web/session";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

// Leaving is a person's own membership: any role may, except the last owner (the use case says so).
export const leaveFarmAction = validatedAction(leaveFarmForm, async ({ farmId }) => {
  await leaveFarm(await requireUser(), farmId);
  revalidatePath("/", "layout");
  return "You have left the farm.";
});

const remove = validatedAction(deleteFarmForm, async ({ farmId, confirm }) => {
  await deleteFarm(await requireMember({ farmId }, "manage"), confirm);
  return "/me/farms";
});

export async function deleteFarmAction(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await remove(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}
