"use client";

import { NewPasswordField } from "@/components/auth/new-password-field";
import { useActionState } from "react";
import type { ActionState } from "@/lib/web/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

// A new account: name and password; on success the action sends the person on to sign in.
export function JoinForm({ token, email, action }: { token: string; email: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <input type="hidden" name="token" value={token} />
      <label className="block">
        <span className="mb-1 block font-bold">E-mail</span>
        <input
          type="email"
          name="username"
          autoComplete="username"
          value={email}
          readOnly
          className="h-12 w-full rounded-xl border border-soil-300 bg-soil-100 px-3 text-lg text-soil-700"
        />
      </label>
      <label className="block">
        <span className="mb-1 block font-bold">Your name</span>
        <input
          name="name"
          autoComplete="name"
          required
          aria-invalid={!!err("name")}
          className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
        />
        {err("name") && <span className="text-sm text-clay-700">{err("name")}</span>}
      </label>
      <NewPasswordField label="Password" error={err("password")} />
      <p aria-live="polite" className="min-h-6 text-clay-700">
        {state.error}
      </p>
      <button disabled={pending} className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Joining…" : "Join the team"}
      </button>
    </form>
  );
}

// Already signed in with the invited address: one tap, then Today of the farm.
export function JoinAsMeForm({ token, farmName, action }: { token: string; farmName: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <form action={formAction} className="space-y-4 rounded-2xl bg-white p-5 ring-1 ring-soil-300">
      <input type="hidden" name="token" value={token} />
      <button disabled={pending} className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Joining…" : `Join ${farmName}`}
      </button>
      <p aria-live="polite" className="min-h-6 text-clay-700">
        {state.error}
      </p>
    </form>
  );
}
