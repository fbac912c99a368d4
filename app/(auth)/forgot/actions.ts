"use server";

import { RESET_ANSWER, requestPasswordReset } from "@/lib/server/auth/password-reset";
import { forgotForm } from "@/lib/domain/validation/team";
import { validatedAction } from "@/lib/web/validated-action";

// One answer whether or not the address has an account.
export const askForReset = validatedAction(forgotForm, async ({ email }) => {
  await requestPasswordReset(email);
  return RESET_ANSWER;
});
