"use client";

import { useActionState, useState } from "react";
import { SegmentedControl } from "@/components/ui/segmented-control";
import type { UnitSystem } from "@/lib/domain/units";
import type { ActionState } from "@/lib/web/validated-action";

type Props = {
  action: (prev: ActionState, form: FormData) => Promise<ActionState>;
  farmId: string;
  name: string;
  unitSystem: UnitSystem;
  timezone: string;
  zones: string[];
};

const UNITS = [
  { value: "metric", label: "Metric (°C, kg)" },
  { value: "imperial", label: "Imperial (°F, lb)" },
] as const;

export function FarmForm({ action, farmId, name, unitSystem, timezone, zones }: Props) {
  const [state, formAction, pending] = useActionState(action, {});
  const [units, setUnits] = useState<UnitSystem>(unitSystem);
  const err = (f: string) => state.fieldErrors?.[f];
  const field = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg";
  return (
    <form action={formAction} className="space-y-4 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 className="text-xl font-bold">Farm</h2>
      <input type="hidden" name="farmId" value={farmId} />
      <label className="block">
        <span className="block font-bold">Farm name</span>
        <input name="name" defaultValue={name} required maxLength={80} aria-invalid={!!err("name")} className={field} />
        {err("name") && <span className="text-sm font-bold text-clay-700">{err("name")}</span>}
      </label>
      <div>
        <span id="units-label" className="block font-bold">
          Units
        </span>
        <span className="block text-sm text-soil-700">Readings are stored metric; this only changes what everyone sees.</span>
        <div className="mt-1">
          <SegmentedControl label="Units" options={UNITS} value={units} onChange={setUnits} />
        </div>
        <input type="hidden" name="unitSystem" value={units} />
        {err("unitSystem") && <span className="text-sm font-bold text-clay-700">{err("unitSystem")}</span>}
      </div>
      <label className="block">
        <span className="block font-bold">Timezone</span>
        <span className="block text-sm text-soil-700">For logbook times and the day&apos;s charts.</span>
        <input name="timezone" defaultValue={timezone} list="tz-list" autoComplete="off" aria-invalid={!!err("timezone")} className={field} />
        <datalist id="tz-list">
          {zones.map((z) => (
            <option key={z} value={z} />
          ))}
        </datalist>
        {err("timezone") && <span className="text-sm font-bold text-clay-700">{err("timezone")}</span>}
      </label>
      <button disabled={pending} className="min-h-12 w-full rounded-xl bg-soil-800 px-4 font-bold text-white disabled:opacity-60">
        {pending ? "Saving…" : "Save farm settings"}
      </button>
      <p aria-live="polite" className={`min-h-6 text-sm ${state.error ? "text-clay-700" : "text-leaf-700"}`}>
        {state.error ?? state.ok}
      </p>
    </form>
  );
}
