"use client";

import { useActionState } from "react";
import { FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

export function ForgotForm({ action }: { action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = state.fieldErrors?.email;
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <TextField label="E-mail" error={err} name="email" type="email" autoComplete="username" inputMode="email" required />
      <FormAnswer state={state} />
      <SubmitButton pending={pending} busy="Sending…">
        Send me a link
      </SubmitButton>
    </form>
  );
}
