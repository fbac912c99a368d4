"use client";

import { useActionState } from "react";
import { FormAnswer, SubmitButton, type FormAction } from "@/components/ui/form-parts";

/** A form that is only a button (confirm an address, send the link again) and its answer. */
export function OneButtonForm({ action, label, busy, hidden }: { action: FormAction; label: string; busy: string; hidden?: Record<string, string> }) {
  const [state, formAction, pending] = useActionState(action, {});
  return (
    <form action={formAction} className="space-y-3">
      {Object.entries(hidden ?? {}).map(([k, v]) => (
        <input key={k} type="hidden" name={k} value={v} />
      ))}
      <SubmitButton pending={pending} busy={busy}>
        {label}
      </SubmitButton>
      <FormAnswer state={state} />
    </form>
  );
}
