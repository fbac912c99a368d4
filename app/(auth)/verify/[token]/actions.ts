"use server";

import { redirect } from "next/navigation";
import { verifyEmail } from "@/lib/server/auth/sign-up";
import { verifyForm } from "@/lib/domain/validation/sign-up";
import { currentUserId } from "@/lib/web/session";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

// The link is the credential; the signed-in person goes straight in, anyone else on to sign in.
const confirm = validatedAction(verifyForm, async ({ token }) => {
  const { userId } = await verifyEmail(token);
  return (await currentUserId()) === userId ? "/" : "/sign-in?notice=verified";
});

export async function confirmAddress(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await confirm(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}
