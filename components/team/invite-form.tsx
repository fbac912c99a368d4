"use client";

import { useActionState } from "react";
import { ROLE_WORDS, ROLES } from "@/lib/domain/team-words";
import { FieldError, FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

export function InviteForm({ farmId, action }: { farmId: string; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} className="space-y-4 rounded-2xl bg-white p-4 ring-1 ring-soil-300" aria-labelledby="invite-h">
      <h2 id="invite-h" className="text-xl font-bold">
        Invite someone
      </h2>
      <input type="hidden" name="farmId" value={farmId} />
      <TextField label="E-mail" error={err("email")} name="email" type="email" inputMode="email" autoComplete="off" required />
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
        <FieldError error={err("role")} />
      </fieldset>
      <SubmitButton pending={pending} busy="Sending…">
        Send invitation
      </SubmitButton>
      <FormAnswer state={state} small />
    </form>
  );
}
