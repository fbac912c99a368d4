"use client";

import { useActionState } from "react";
import { NewPasswordField } from "@/components/auth/new-password-field";
import { FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

export function SignUpForm({ action }: { action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = state.fieldErrors ?? {};
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <TextField label="Your name" error={err.name} name="name" autoComplete="name" required maxLength={80} />
      <TextField label="E-mail" error={err.email} name="email" type="email" autoComplete="username" inputMode="email" required />
      <NewPasswordField label="Password" error={err.password} />
      <FormAnswer state={{ error: state.error }} />
      <SubmitButton pending={pending} busy="Making your account…">
        Make my account
      </SubmitButton>
    </form>
  );
}
