"use server";

import { redirect } from "next/navigation";
import { deleteMyAccount } from "@/lib/server/people/my-data";
import { deleteAccountForm } from "@/lib/domain/validation/sign-up";
import { requireUser } from "@/lib/web/session";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

const remove = validatedAction(deleteAccountForm, async ({ confirm }) => {
  await deleteMyAccount(await requireUser(), confirm);
  return "/sign-in";
});

// Gone: the session names no one any more, so the sign-in page is next.
export async function deleteAccountAction(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await remove(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}
