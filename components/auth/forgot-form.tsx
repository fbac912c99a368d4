"use client";

import { useActionState } from "react";
import type { ActionState } from "@/lib/web/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

export function ForgotForm({ action }: { action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = state.fieldErrors?.email;
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <label className="block">
        <span className="mb-1 block font-bold">E-mail</span>
        <input
          name="email"
          type="email"
          autoComplete="username"
          inputMode="email"
          required
          aria-invalid={!!err}
          className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
        />
        {err && <span className="text-sm text-clay-700">{err}</span>}
      </label>
      <p aria-live="polite" className={`min-h-6 ${state.error ? "text-clay-700" : "text-leaf-700"}`}>
        {state.error ?? state.ok}
      </p>
      <button disabled={pending} className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Sending…" : "Send me a link"}
      </button>
    </form>
  );
}
