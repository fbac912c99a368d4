"use client";

import { useActionState } from "react";
import { FormAnswer, SubmitButton, TextField } from "@/components/ui/form-parts";
import type { ActionState } from "@/lib/web/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

export function ForgotForm({ action }: { action: Action }) {
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
