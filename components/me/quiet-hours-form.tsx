"use client";

import { useActionState } from "react";
import type { ActionState } from "@/lib/web/validated-action";

type Props = {
  action: (prev: ActionState, form: FormData) => Promise<ActionState>;
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
      <p className="text-sm text-soil-700">Heads-ups wait until your quiet hours end (unless someone has taken them on); act-now alerts always come through.</p>
      <div className="grid grid-cols-2 gap-3">
        <label className="block">
          <span className="block font-bold">From</span>
          <input
            type="time"
            name="quietFrom"
            defaultValue={quietFrom ?? ""}
            aria-invalid={!!err("quietFrom")}
            className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3"
          />
          {err("quietFrom") && <span className="text-sm text-clay-700">{err("quietFrom")}</span>}
        </label>
        <label className="block">
          <span className="block font-bold">To</span>
          <input
            type="time"
            name="quietTo"
            defaultValue={quietTo ?? ""}
            aria-invalid={!!err("quietTo")}
            className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3"
          />
          {err("quietTo") && <span className="text-sm text-clay-700">{err("quietTo")}</span>}
        </label>
      </div>
      <label className="block">
        <span className="block font-bold">Timezone</span>
        <input
          name="timezone"
          defaultValue={timezone}
          aria-invalid={!!err("timezone")}
          className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3"
        />
        {err("timezone") && <span className="text-sm text-clay-700">{err("timezone")}</span>}
      </label>
      <button disabled={pending} className="min-h-12 rounded-xl bg-soil-800 px-4 font-bold text-white disabled:opacity-60">
        {pending ? "Saving…" : "Save quiet hours"}
      </button>
      <p aria-live="polite" className={`min-h-6 text-sm ${state.error ? "text-clay-700" : "text-leaf-700"}`}>
        {state.error ?? state.ok}
      </p>
    </form>
  );
}
