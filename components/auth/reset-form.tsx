"use client";

import { useActionState } from "react";
import type { ActionState } from "@/lib/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

export function ResetForm({ token, email, action }: { token: string; email: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = state.fieldErrors?.password;
  return (
    <form action={formAction} className="ring-soil-300 space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1">
      <input type="hidden" name="token" value={token} />
      <input type="email" name="username" autoComplete="username" value={email} readOnly hidden />
      <label className="block">
        <span className="mb-1 block font-bold">New password</span>
        <span className="text-soil-700 block text-sm">10 to 72 characters; a few words make a good one.</span>
        <input
          name="password"
          type="password"
          autoComplete="new-password"
          required
          minLength={10}
          aria-invalid={!!err}
          className="border-soil-300 bg-paper h-12 w-full rounded-xl border px-3 text-lg"
        />
        {err && <span className="text-clay-700 text-sm">{err}</span>}
      </label>
      <p aria-live="polite" className="text-clay-700 min-h-6">
        {state.error}
      </p>
      <button disabled={pending} className="bg-leaf-700 h-14 w-full rounded-xl text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Saving…" : "Set new password"}
      </button>
    </form>
  );
}
