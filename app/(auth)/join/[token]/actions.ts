"use server";

import { redirect } from "next/navigation";
import { requireUser } from "@/lib/web/session";
import { joinAsUser } from "@/lib/server/team/join-as-user";
import { joinWithNewAccount } from "@/lib/server/team/join-with-new-account";
import { joinMeForm, joinNewForm } from "@/lib/domain/validation/team";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

// Each returns the address to go to next; the redirect runs outside validatedAction, which catches throws.
const asNew = validatedAction(joinNewForm, async ({ token, name, password }) => {
  const j = await joinWithNewAccount(token, { name, password });
  return `/sign-in?notice=joined&next=${encodeURIComponent(`/farms/${j.farmId}`)}`;
});

const asMe = validatedAction(joinMeForm, async ({ token }) => {
  const j = await joinAsUser({ userId: await requireUser() }, token);
  return `/farms/${j.farmId}`;
});

export async function joinNew(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await asNew(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}

export async function joinMe(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await asMe(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}
