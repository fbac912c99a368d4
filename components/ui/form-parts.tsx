import { useId, type InputHTMLAttributes, type ReactNode } from "react";
import type { ActionState } from "@/lib/web/validated-action";
import { Mark } from "./marks";

// The pieces every form is built from, so a field, its error and the form's answer look and read
// the same everywhere: the label names the input, an error is tied to it (aria-describedby), and
// the answer is announced (aria-live) where the button is.

/** A server action as useActionState calls it (lib/web/validated-action.ts). */
export type FormAction = (prev: ActionState, form: FormData) => Promise<ActionState>;

export const INPUT_CLASS = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg";

type FieldProps = { label: string; hint?: ReactNode; error?: string; children?: ReactNode } & InputHTMLAttributes<HTMLInputElement>;

/** A labelled input with an optional hint under the label and its error under the input. */
export function TextField({ label, hint, error, children, className, ...input }: FieldProps) {
  const errorId = useId();
  return (
    <label className="block">
      <span className="mb-1 block font-bold">{label}</span>
      {hint && <span className="block text-sm text-soil-700">{hint}</span>}
      <input aria-invalid={!!error} aria-describedby={error ? errorId : undefined} className={className ?? INPUT_CLASS} {...input} />
      {children}
      <FieldError id={errorId} error={error} />
    </label>
  );
}

/** A field's error in words, or nothing. */
export function FieldError({ id, error }: { id?: string; error?: string }) {
  return error ? (
    <span id={id} className="flex items-center gap-1 text-sm text-clay-700">
      <Mark name="error" />
      {error}
    </span>
  ) : null;
}

/** The form's answer: its error, or what was done. */
export function FormAnswer({ state, small }: { state: ActionState; small?: boolean }) {
  return (
    <p aria-live="polite" className={`min-h-6 ${small ? "text-sm" : ""} ${state.error ? "text-clay-700" : "text-leaf-700"}`}>
      {state.error ?? state.ok}
    </p>
  );
}

/** The form's one button; it says what is happening while the form is sent. */
export function SubmitButton({ pending, busy, children, quiet }: { pending: boolean; busy: string; children: ReactNode; quiet?: boolean }) {
  const look = quiet ? "min-h-12 rounded-xl bg-soil-800 px-4" : "h-14 w-full rounded-xl bg-leaf-700 text-lg";
  return (
    <button disabled={pending} className={`${look} font-bold text-white disabled:opacity-60`}>
      {pending ? busy : children}
    </button>
  );
}

/** What a logging form says after a try: a tick or a cross (so it reads without colour) and words. */
export function LogStatus({ status }: { status: { ok: boolean; text: string } | null }) {
  return (
    <p role="status" aria-live="polite" className={`min-h-6 text-sm font-bold ${status?.ok ? "text-leaf-700" : "text-clay-700"}`}>
      {status && (
        <span className="inline-flex items-center gap-1">
          <Mark name={status.ok ? "done" : "error"} />
          {status.text}
        </span>
      )}
    </p>
  );
}
