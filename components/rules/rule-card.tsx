"use client";

import { useMemo, useState } from "react";
import type { RuleKindRow, RuleParam } from "@/lib/client/wire";
import { formatNumber, type UnitSystem } from "@/lib/domain/units";
import { ruleInWords, sourceInWords } from "@/lib/domain/rules/summary";
import type { RuleKind } from "@/lib/domain/rules/params";
import { Mark } from "@/components/ui/marks";
import { RulePreview } from "./rule-preview";
import { fromShown, toShown, unitLabel } from "./rule-units";

export type KindState = { enabled: boolean; thresholds: Record<string, number> };

/** What a kind's card says after a save, a reset or a refused value. */
export type RuleMessage = { ok?: string; error?: string; fieldErrors?: Record<string, string> };

const shown = (n: number) => formatNumber(n, Number.isInteger(n) ? 0 : Math.min(4, String(n).split(".")[1]?.length ?? 1));

type Props = {
  binId: string;
  timezone: string;
  row: RuleKindRow;
  word: string;
  own: { enabled?: boolean; thresholds?: Record<string, number> } | undefined;
  effective: { enabled: boolean; t: Record<string, number> };
  system: UnitSystem;
  canEdit: boolean;
  busy: boolean;
  message: RuleMessage | undefined;
  onSave: (s: KindState) => void;
  onReset: () => void;
  onInvalid: (m: RuleMessage) => void;
};

// One alert kind: its switch, each number with the species default and where that default comes from,
// and (for owners) an input holding this bin's own value; blank means "use the default".
export function RuleCard({ binId, timezone, row, word, own, effective, system, canEdit, busy, message, onSave, onReset, onInvalid }: Props) {
  const ownT = own?.thresholds ?? {};
  const initialText = (p: RuleParam) => (ownT[p.key] === undefined ? "" : String(toShown(p.key, p.unit, ownT[p.key]!, system)));
  const [enabled, setEnabled] = useState(effective.enabled);
  const [texts, setTexts] = useState<Record<string, string>>(() => Object.fromEntries(row.params.map((p) => [p.key, initialText(p)])));
  const id = `rule-${row.kind}`;
  const hasOwn = own !== undefined;
  const errors = message?.fieldErrors ?? {};

  /** The card's values as a PUT would send them, or the first field that is not a number. */
  function parse(): { state: KindState } | { field: string } {
    const thresholds: Record<string, number> = {};
    for (const p of row.params) {
      const text = (texts[p.key] ?? "").trim();
      if (text === "") continue;
      // An untouched value goes back exactly as stored, so a °F round trip cannot drift it.
      if (text === initialText(p) && ownT[p.key] !== undefined) {
        thresholds[p.key] = ownT[p.key]!;
        continue;
      }
      const n = Number(text.replace(",", "."));
      if (!Number.isFinite(n)) return { field: p.key };
      thresholds[p.key] = fromShown(p.key, p.unit, n, system);
    }
    return { state: { enabled, thresholds } };
  }

  function submit(e: React.FormEvent) {
    e.preventDefault();
    const parsed = parse();
    if ("field" in parsed) {
      onInvalid({ error: "Check the marked field.", fieldErrors: { [parsed.field]: "Give a number, or leave it blank for the default." } });
      return;
    }
    onSave(parsed.state);
  }

  // Changed from what is stored? Then the preview shows what the change would have raised.
  const dirty = enabled !== effective.enabled || row.params.some((p) => (texts[p.key] ?? "").trim() !== initialText(p));
  const parsed = canEdit && dirty ? parse() : null;
  const changeKey = parsed && "state" in parsed ? JSON.stringify(parsed.state) : null;
  const change = useMemo(() => (changeKey ? (JSON.parse(changeKey) as KindState) : null), [changeKey]);

  return (
    <section id={id} aria-labelledby={`${id}-h`} className="scroll-mt-20 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <form onSubmit={submit} noValidate className="space-y-3">
        <div className="flex items-center justify-between gap-3">
          <h2 id={`${id}-h`} className="text-xl font-bold">
            {word}
          </h2>
          {canEdit ? (
            <button
              type="button"
              role="switch"
              aria-checked={enabled}
              aria-label={`${word} alerts`}
              onClick={() => setEnabled((v) => !v)}
              className={`flex min-h-12 min-w-28 items-center justify-center gap-2 rounded-full px-3 font-bold ring-1 ${enabled ? "bg-leaf-100 text-leaf-700 ring-leaf-500" : "bg-soil-100 text-soil-700 ring-soil-300"}`}
            >
              <span aria-hidden="true" className={`inline-block h-3 w-3 ${enabled ? "rounded-full bg-leaf-700" : "border-2 border-soil-700"}`} />
              {enabled ? "On" : "Off"}
            </button>
          ) : (
            <span className="rounded-full bg-soil-100 px-3 py-1 font-bold">{effective.enabled ? "On" : "Off"}</span>
          )}
        </div>
        <p id={`${id}-does`}>{ruleInWords(row.kind as RuleKind, { ...Object.fromEntries(row.params.map((p) => [p.key, p.value])), ...effective.t }, system)}</p>
        <p className="text-sm text-soil-700">{hasOwn ? "This bin has its own values." : "Uses the species defaults."}</p>

        <ul className="divide-y divide-soil-100">
          {row.params.map((p) => {
            const unit = unitLabel(p.unit, system);
            const def = toShown(p.key, p.unit, p.value, system);
            const now = toShown(p.key, p.unit, effective.t[p.key] ?? p.value, system);
            const err = errors[p.key];
            const inputId = `${id}-${p.key}`;
            return (
              <li key={p.key} className="py-3">
                <label htmlFor={canEdit ? inputId : undefined} className="block leading-snug font-bold">
                  {p.label}
                </label>
                <p className="mt-0.5 text-sm">
                  Default{" "}
                  <span className="tabular">
                    {shown(def)} {unit}
                  </span>
                </p>
                {canEdit ? (
                  <div className="mt-2">
                    <div className="flex items-center gap-2">
                      <input
                        id={inputId}
                        name={p.key}
                        type="number"
                        step="any"
                        inputMode="decimal"
                        value={texts[p.key] ?? ""}
                        placeholder={shown(def)}
                        onChange={(e) => setTexts((t) => ({ ...t, [p.key]: e.target.value }))}
                        aria-invalid={!!err}
                        aria-describedby={err ? `${inputId}-err` : undefined}
                        className={`tabular h-12 w-36 rounded-xl border bg-paper px-3 text-lg ${err ? "border-2 border-clay-700" : "border-soil-300"}`}
                      />
                      <span className="tabular text-soil-700">{unit}</span>
                    </div>
                    {err && (
                      <p id={`${inputId}-err`} className="mt-1 flex items-center gap-1 text-sm font-bold text-clay-700">
                        <Mark name="error" />
                        {err}
                      </p>
                    )}
                  </div>
                ) : (
                  <p className="mt-1">
                    This bin:{" "}
                    <span className="tabular font-bold">
                      {shown(now)} {unit}
                    </span>
                    {now !== def && <span className="text-sm text-soil-700"> (own value)</span>}
                  </p>
                )}
              </li>
            );
          })}
        </ul>

        <details className="text-sm text-soil-700">
          <summary className="min-h-11 cursor-pointer py-2 font-bold">Where this comes from</summary>
          <dl className="space-y-2">
            {row.params.map((p) => (
              <div key={p.key}>
                <dt className="font-bold">{p.label}</dt>
                <dd>{sourceInWords(p.source)}</dd>
              </div>
            ))}
          </dl>
        </details>

        {change && <RulePreview binId={binId} kind={row.kind as RuleKind} word={word} change={change} system={system} timezone={timezone} />}
        {parsed && "field" in parsed && <p className="text-sm text-soil-700">The preview waits for a number in every box you have filled.</p>}

        {canEdit && (
          <div className="grid grid-cols-2 gap-2">
            <button disabled={busy} className="min-h-12 rounded-xl bg-soil-800 px-4 font-bold text-white disabled:opacity-60">
              {busy ? "Saving…" : `Save ${word.toLowerCase()} rule`}
            </button>
            <button
              type="button"
              disabled={busy || !hasOwn}
              onClick={onReset}
              className="min-h-12 rounded-xl bg-white px-3 font-bold ring-1 ring-soil-500 disabled:opacity-50"
            >
              Back to defaults
            </button>
          </div>
        )}
        <p aria-live="polite" className={`min-h-6 text-sm ${message?.error ? "text-clay-700" : "text-leaf-700"}`}>
          {message?.error ?? message?.ok}
        </p>
      </form>
    </section>
  );
}
