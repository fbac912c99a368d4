"use client";

import { useActionState, useEffect, useRef } from "react";
import { FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

// The time zone is the phone's own unless the person types another; the server checks it is a
// real IANA name (lib/domain/validation/fields.ts timeZone).
export function StartFarmForm({ action }: { action: FormAction }) {
  const [state, formAction, pending] = useActionState(action, {});
  const form = useRef<HTMLFormElement>(null);
  useEffect(() => {
    const zone = form.current?.elements.namedItem("timezone");
    if (zone instanceof HTMLInputElement && !zone.value) zone.value = Intl.DateTimeFormat().resolvedOptions().timeZone;
  }, []);
  const err = state.fieldErrors ?? {};
  return (
    <form ref={form} action={formAction} className="space-y-5 rounded-2xl bg-white p-5 shadow-sm ring-1 ring-soil-300">
      <TextField label="Farm name" error={err.name} name="name" required maxLength={80} autoComplete="off" />
      <TextField
        label="Time zone"
        hint="Your phone's, unless the farm is elsewhere: a name such as Europe/Dublin."
        error={err.timezone}
        name="timezone"
        required
        autoComplete="off"
      />
      <fieldset>
        <legend className="mb-1 font-bold">Units</legend>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="unitSystem" value="metric" defaultChecked /> Metric (kg, L, °C)
        </label>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="unitSystem" value="imperial" /> Imperial (lb, gal, °F)
        </label>
        {err.unitSystem && <p className="text-sm text-clay-700">{err.unitSystem}</p>}
      </fieldset>
      <FormAnswer state={{ error: state.error }} />
      <SubmitButton pending={pending} busy="Starting…">
        Start the farm
      </SubmitButton>
    </form>
  );
}
