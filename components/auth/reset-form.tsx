"use client";

import { NewPasswordField } from "@/components/auth/new-password-field";
import { useActionState } from "react";
import type { ActionState } from "@/lib/web/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

export function ResetForm({ token, email, action }: { token: string; email: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = state.fieldErrors?.password;
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <input type="hidden" name="token" value={token} />
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <NewPasswordField label="New password" error={err} />
      <p aria-live="polite" className="min-h-6 text-clay-700">
        {state.error}
      </p>
      <button disabled={pending} className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Saving…" : "Set new password"}
      </button>
    </form>
  );
}
