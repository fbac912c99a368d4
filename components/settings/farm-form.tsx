"use client";

import { useActionState, useState } from "react";
import { SegmentedControl } from "@/components/ui/segmented-control";
import type { UnitSystem } from "@/lib/domain/units";
import { FieldError, FormAnswer, SubmitButton, TextField, type FormAction } from "@/components/ui/form-parts";

type Props = {
  action: FormAction;
  farmId: string;
  name: string;
  unitSystem: UnitSystem;
  timezone: string;
  feedingIntervalDays: number;
  zones: string[];
};

const UNITS = [
  { value: "metric", label: "Metric (°C, kg, L)" },
  { value: "imperial", label: "Imperial (°F, lb, US gal)" },
] as const;

export function FarmForm({ action, farmId, name, unitSystem, timezone, feedingIntervalDays, zones }: Props) {
  const [state, formAction, pending] = useActionState(action, {});
  const [units, setUnits] = useState<UnitSystem>(unitSystem);
  const err = (f: string) => state.fieldErrors?.[f];
  return (
    <form action={formAction} className="space-y-4 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 className="text-xl font-bold">Farm</h2>
      <input type="hidden" name="farmId" value={farmId} />
      <TextField label="Farm name" error={err("name")} name="name" defaultValue={name} required maxLength={80} />
      <div>
        <span id="units-label" className="block font-bold">
          Units
        </span>
        <span className="block text-sm text-soil-700">Readings are stored metric; this only changes what everyone sees.</span>
        {/* The one place that names both systems on purpose (data-both-units marks it for the words test). */}
        <div className="mt-1" data-both-units>
          <SegmentedControl label="Units" options={UNITS} value={units} onChange={setUnits} />
        </div>
        <input type="hidden" name="unitSystem" value={units} />
        <FieldError error={err("unitSystem")} />
      </div>
      <TextField
        label="Time zone"
        hint="For logbook times and the day's charts."
        error={err("timezone")}
        name="timezone"
        defaultValue={timezone}
        list="tz-list"
        autoComplete="off"
      >
        <datalist id="tz-list">
          {zones.map((z) => (
            <option key={z} value={z} />
          ))}
        </datalist>
      </TextField>
      <TextField
        label="Days between feedings"
        hint="When each bin's next feeding is due, unless the bin has its own interval. Every few weeks is usual."
        error={err("feedingIntervalDays")}
        name="feedingIntervalDays"
        inputMode="numeric"
        defaultValue={feedingIntervalDays}
        required
        className="tabular h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
      />
      <SubmitButton pending={pending} busy="Saving…" quiet>
        Save farm settings
      </SubmitButton>
      <FormAnswer state={state} small />
    </form>
  );
}
