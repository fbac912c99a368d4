"use client";

import { useActionState } from "react";
import { ROLE_WORDS, ROLES } from "@/lib/domain/team-words";
import type { ActionState } from "@/lib/web/validated-action";

type Action = (prev: ActionState, form: FormData) => Promise<ActionState>;

export function InviteForm({ farmId, action }: { farmId: string; action: Action }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} className="space-y-4 rounded-2xl bg-white p-4 ring-1 ring-soil-300" aria-labelledby="invite-h">
      <h2 id="invite-h" className="text-xl font-bold">
        Invite someone
      </h2>
      <input type="hidden" name="farmId" value={farmId} />
      <label className="block">
        <span className="mb-1 block font-bold">E-mail</span>
        <input
          name="email"
          type="email"
          inputMode="email"
          autoComplete="off"
          required
          aria-invalid={!!err("email")}
          aria-describedby={err("email") ? "invite-email-error" : undefined}
          className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
        />
        {err("email") && (
          <span id="invite-email-error" className="text-sm text-clay-700">
            {err("email")}
          </span>
        )}
      </label>
      <fieldset>
        <legend className="mb-1 font-bold">Role</legend>
        <div className="space-y-2">
          {ROLES.map((r) => (
            <label
              key={r}
              className="flex min-h-12 cursor-pointer items-start gap-3 rounded-xl border border-soil-300 bg-paper p-3 has-checked:border-leaf-700 has-checked:ring-2 has-checked:ring-leaf-500"
            >
              <input type="radio" name="role" value={r} defaultChecked={r === "keeper"} className="mt-1 size-5 accent-leaf-700" />
              <span>
                <span className="block font-bold">{ROLE_WORDS[r].name}</span>
                <span className="block text-sm text-soil-700">{ROLE_WORDS[r].does}</span>
              </span>
            </label>
          ))}
        </div>
        {err("role") && <span className="text-sm text-clay-700">{err("role")}</span>}
      </fieldset>
      <button disabled={pending} className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60">
        {pending ? "Sending…" : "Send invitation"}
      </button>
      <p aria-live="polite" className={`min-h-6 text-sm ${state.error ? "text-clay-700" : "text-leaf-700"}`}>
        {state.error ?? state.ok}
      </p>
    </form>
  );
}
