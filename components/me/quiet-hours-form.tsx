"use client";

import { useActionState } from "react";
import { FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

type Props = {
  action: FormAction;
  quietFrom: string | null;
  quietTo: string | null;
  timezone: string;
};

export function QuietHoursForm({ action, quietFrom, quietTo, timezone }: Props) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 className="text-lg font-bold">Quiet hours</h2>
      <p className="text-sm text-soil-700">Heads-ups wait until your quiet hours end (unless someone has claimed them); act-now alerts always come through.</p>
      <div className="grid grid-cols-2 gap-3">
        <TextField label="From" error={err("quietFrom")} type="time" name="quietFrom" defaultValue={quietFrom ?? ""} />
        <TextField label="To" error={err("quietTo")} type="time" name="quietTo" defaultValue={quietTo ?? ""} />
      </div>
      <TextField label="Time zone" error={err("timezone")} name="timezone" defaultValue={timezone} />
      <SubmitButton pending={pending} busy="Saving…" quiet>
        Save quiet hours
      </SubmitButton>
      <FormAnswer state={state} small />
    </form>
  );
}
