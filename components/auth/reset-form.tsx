"use client";

import { NewPasswordField } from "@/components/auth/new-password-field";
import { useActionState } from "react";
import { FormAnswer, SubmitButton, type FormAction } from "@/components/ui/form-parts";

export function ResetForm({ token, email, action }: { token: string; email: string; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = state.fieldErrors?.password;
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <input type="hidden" name="token" value={token} />
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <NewPasswordField label="New password" error={err} />
      <FormAnswer state={{ error: state.error }} />
      <SubmitButton pending={pending} busy="Saving…">
        Set new password
      </SubmitButton>
    </form>
  );
}
