"use server";

import { redirect } from "next/navigation";
import { signUp } from "@/lib/server/auth/sign-up";
import { signUpForm } from "@/lib/domain/validation/sign-up";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

const make = validatedAction(signUpForm, (input) => signUp(input));

// One answer whether or not the address has an account: the "check your mail" screen.
export async function signUpAction(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await make(prev, form);
  if (result.ok) redirect("/check-mail");
  return result;
}
