"use client";

import { useActionState } from "react";
import type { ActionState } from "@/lib/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

// A new account: name and password; on success the action sends the person on to sign in.
export function JoinForm({ token, email, action }: { token: string; email: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} className="ring-soil-300 space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1">
      <input type="hidden" name="token" value={token} />
      <label className="block">
        <span className="mb-1 block font-bold">E-mail</span>
        <input
          type="email"
          name="username"
          autoComplete="username"
          value={email}
          readOnly
          className="border-soil-300 bg-soil-100 text-soil-700 h-12 w-full rounded-xl border px-3 text-lg"
        />
      </label>
      <label className="block">
        <span className="mb-1 block font-bold">Your name</span>
        <input
          name="name"
          autoComplete="name"
          required
          aria-invalid={!!err("name")}
          className="border-soil-300 bg-paper h-12 w-full rounded-xl border px-3 text-lg"
        />
        {err("name") && <span className="text-clay-700 text-sm">{err("name")}</span>}
      </label>
      <label className="block">
        <span className="mb-1 block font-bold">Password</span>
        <span className="text-soil-700 block text-sm">10 to 72 characters; a few words make a good one.</span>
        <input
          name="password"
          type="password"
          autoComplete="new-password"
          required
          minLength={10}
          aria-invalid={!!err("password")}
          className="border-soil-300 bg-paper h-12 w-full rounded-xl border px-3 text-lg"
        />
        {err("password") && <span className="text-clay-700 text-sm">{err("password")}</span>}
      </label>
      <p aria-live="polite" className="text-clay-700 min-h-6">
        {state.error}
      </p>
      <button disabled={pending} className="bg-leaf-700 h-14 w-full rounded-xl text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Joining…" : "Join the team"}
      </button>
    </form>
  );
}

// Already signed in with the invited address: one tap, then Today of the farm.
export function JoinAsMeForm({ token, farmName, action }: { token: string; farmName: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <form action={formAction} className="ring-soil-300 space-y-4 rounded-2xl bg-white p-5 ring-1">
      <input type="hidden" name="token" value={token} />
      <button disabled={pending} className="bg-leaf-700 h-14 w-full rounded-xl text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Joining…" : `Join ${farmName}`}
      </button>
      <p aria-live="polite" className="text-clay-700 min-h-6">
        {state.error}
      </p>
    </form>
  );
}
