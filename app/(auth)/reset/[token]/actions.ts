"use server";

import { redirect } from "next/navigation";
import { resetPassword } from "@/lib/server/auth/password-reset";
import { resetForm } from "@/lib/domain/validation/team";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

const reset = validatedAction(resetForm, async ({ token, password }) => {
  await resetPassword(token, password);
  return "/sign-in?notice=password-set";
});

// On success, straight to sign-in (redirect must run outside validatedAction, which catches throws);
// it also works without script, where a re-render of this page would only say "already used".
export async function setNewPassword(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await reset(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}
