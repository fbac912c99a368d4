"use client";

import { useActionState } from "react";
import { FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

/** The bin's own feeding interval (empty: the farm's) and the day its harvest side is planned (empty: none). */
export function BinCycleForm({
  action,
  binId,
  intervalDays,
  farmIntervalDays,
  plannedHarvestOn,
}: {
  action: FormAction;
  binId: string;
  intervalDays: number | null;
  farmIntervalDays: number;
  plannedHarvestOn: string | null;
}) {
  const [state, formAction, pending] = useActionState(action, {});
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} noValidate className="space-y-3">
      <input type="hidden" name="binId" value={binId} />
      <TextField
        label="Days between feedings"
        hint={`Leave empty for the farm's ${farmIntervalDays} days.`}
        error={err("feedingIntervalDays")}
        name="feedingIntervalDays"
        inputMode="numeric"
        defaultValue={intervalDays ?? ""}
        className="tabular h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
      />
      <TextField
        label="Planned harvest"
        hint="Leave empty when none is planned."
        error={err("plannedHarvestOn")}
        name="plannedHarvestOn"
        type="date"
        defaultValue={plannedHarvestOn ?? ""}
      />
      <SubmitButton pending={pending} busy="Saving…" quiet>
        Save
      </SubmitButton>
      <FormAnswer state={state} small />
    </form>
  );
}
