"use client";

import { useActionState } from "react";
import { FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

export function LeaveFarmForm({ farmId, action }: { farmId: string; action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <form action={formAction} className="space-y-2">
      <input type="hidden" name="farmId" value={farmId} />
      <SubmitButton pending={pending} busy="Leaving…" quiet>
        Leave this farm
      </SubmitButton>
      <FormAnswer state={state} small />
    </form>
  );
}

/** Typing the farm's name (or the account's words) again is the confirmation: nothing of it comes back. */
export function ConfirmDeleteForm({
  label,
  hint,
  hidden,
  button,
  action,
}: {
  label: string;
  hint: string;
  hidden?: Record<string, string>;
  button: string;
  action: FormAction;
}) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <form action={formAction} className="space-y-3">
      {Object.entries(hidden ?? {}).map(([k, v]) => (
        <input key={k} type="hidden" name={k} value={v} />
      ))}
      <TextField label={label} hint={hint} error={state.fieldErrors?.confirm} name="confirm" autoComplete="off" required />
      <button disabled={pending} className="min-h-12 w-full rounded-xl bg-clay-700 px-4 font-bold text-white disabled:opacity-60">
        {pending ? "Deleting…" : button}
      </button>
      <FormAnswer state={{ error: state.fieldErrors?.confirm ? undefined : state.error }} small />
    </form>
  );
}
