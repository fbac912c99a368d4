"use client";

import { Mark } from "./marks";

type Option<T extends string> = { value: T; label: string };

// A row of toggle buttons, one thumb-sized target each; the chosen one is bold, raised and dotted,
// so the choice never rests on colour alone.
export function SegmentedControl<T extends string>({
  label,
  options,
  value,
  onChange,
}: {
  label: string;
  options: readonly Option<T>[];
  value: T;
  onChange: (v: T) => void;
}) {
  return (
    <div role="group" aria-label={label} className="grid auto-cols-fr grid-flow-col gap-1 rounded-xl bg-soil-100 p-1 ring-1 ring-soil-300">
      {options.map((o) => {
        const on = o.value === value;
        return (
          <button
            key={o.value}
            type="button"
            aria-pressed={on}
            onClick={() => onChange(o.value)}
            className={`tabular flex min-h-12 items-center justify-center gap-1 rounded-lg px-2 text-base ${on ? "bg-white font-bold text-soil-900 shadow ring-1 ring-soil-500" : "text-soil-700"}`}
          >
            {on && <Mark name="chosen" />}
            {o.label}
          </button>
        );
      })}
    </div>
  );
}
