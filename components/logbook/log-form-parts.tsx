// Pieces the bin's log forms share: the "Where" choice, a number field with its error beside it,
// and the form's frame (heading, button, the aria-live answer).
import type { ReactNode } from "react";
import { zoneWords } from "@/components/logbook/format";
import { LogStatus } from "@/components/ui/form-parts";
import type { ZoneChoice } from "@/lib/client/wire";

export const INPUT = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg";

/** A typed amount as a number; a comma works as the decimal mark; empty is NaN. */
export const num = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(",", ".")));

export function FieldError({ id, error }: { id: string; error?: string }) {
  return error ? (
    <p id={id} className="mt-1 text-sm font-bold text-clay-700">
      {error}
    </p>
  ) : null;
}

export function ZoneSelect({
  id,
  zones,
  value,
  onChange,
  error,
  wholeBin = true,
}: {
  id: string;
  zones: ZoneChoice[];
  value: string;
  onChange: (v: string) => void;
  error?: string;
  wholeBin?: boolean;
}) {
  return (
    <div>
      <label htmlFor={id} className="block font-bold">
        Where
      </label>
      <select
        id={id}
        value={value}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={!!error}
        aria-describedby={error ? `${id}-error` : undefined}
        className={INPUT}
      >
        {wholeBin && <option value="">Whole bin</option>}
        {zones.map((z) => (
          <option key={z.id} value={z.id}>
            {zoneWords(z)}
          </option>
        ))}
      </select>
      <FieldError id={`${id}-error`} error={error} />
    </div>
  );
}

export function NumberField({
  id,
  label,
  value,
  onChange,
  error,
}: {
  id: string;
  label: string;
  value: string;
  onChange: (v: string) => void;
  error?: string;
}) {
  return (
    <div>
      <label htmlFor={id} className="block font-bold">
        {label}
      </label>
      <input
        id={id}
        inputMode="decimal"
        value={value}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={!!error}
        aria-describedby={error ? `${id}-error` : undefined}
        className={`${INPUT} tabular`}
      />
      <FieldError id={`${id}-error`} error={error} />
    </div>
  );
}

/** A log form's frame: its heading names it, one big button sends it, the answer is read out. */
export function LogFormFrame({
  id,
  title,
  button,
  busy,
  busyWords = "Logging…",
  disabled,
  status,
  onSubmit,
  children,
}: {
  id: string;
  title: string;
  button: string;
  busy: boolean;
  busyWords?: string;
  disabled?: boolean;
  status: { ok: boolean; text: string } | null;
  onSubmit: (e: React.FormEvent<HTMLFormElement>) => void;
  children: ReactNode;
}) {
  return (
    <form onSubmit={onSubmit} noValidate aria-labelledby={`${id}-h`} className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id={`${id}-h`} className="text-xl font-bold">
        {title}
      </h2>
      {children}
      <button disabled={busy || disabled} className="min-h-12 w-full rounded-xl bg-leaf-700 px-4 text-lg font-bold text-white disabled:opacity-60">
        {busy ? busyWords : button}
      </button>
      <LogStatus status={status} />
    </form>
  );
}
