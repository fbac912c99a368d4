"use client";

import { useActionState } from "react";
import type { ActionState } from "@/lib/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

export function ResetForm({ token, email, action }: { token: string; email: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = state.fieldErrors?.password;
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <input type="hidden" name="token" value={token} />
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <label className="block">
        <span className="mb-1 block font-bold">New password</span>
        <span className="block text-sm text-soil-700">10 to 72 characters; a few words make a good one.</span>
        <input name="password" type="password" autoComplete="new-password" required minLength={10} aria-invalid={!!err}
          className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg" />
        {err && <span className="text-sm text-clay-700">{err}</span>}
      </label>
      <p aria-live="polite" className="min-h-6 text-clay-700">{state.error}</p>
      <button disabled={pending} className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Saving…" : "Set new password"}
      </button>
    </form>
  );
}
