"use client";

import { NewPasswordField } from "@/components/auth/new-password-field";
import { useActionState } from "react";
import { FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

// A new account: name and password; on success the action sends the person on to sign in.
export function JoinForm({ token, email, action }: { token: string; email: string; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <input type="hidden" name="token" value={token} />
      <TextField
        label="E-mail"
        type="email"
        name="username"
        autoComplete="username"
        value={email}
        readOnly
        className="h-12 w-full rounded-xl border border-soil-300 bg-soil-100 px-3 text-lg text-soil-700"
      />
      <TextField label="Your name" error={err("name")} name="name" autoComplete="name" required />
      <NewPasswordField label="Password" error={err("password")} />
      <FormAnswer state={{ error: state.error }} />
      <SubmitButton pending={pending} busy="Joining…">
        Join the team
      </SubmitButton>
    </form>
  );
}

// Already signed in with the invited address: one tap, then Today of the farm.
export function JoinAsMeForm({ token, farmName, action }: { token: string; farmName: string; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <form action={formAction} className="space-y-4 rounded-2xl bg-white p-5 ring-1 ring-soil-300">
      <input type="hidden" name="token" value={token} />
      <SubmitButton pending={pending} busy="Joining…">{`Join ${farmName}`}</SubmitButton>
      <FormAnswer state={{ error: state.error }} />
    </form>
  );
}
