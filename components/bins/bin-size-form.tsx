"use client";

import { useRouter } from "next/navigation";
import { useSWRConfig } from "swr";
import { binKey } from "@/lib/client/hooks/use-bin";
import { useId, useRef, useState } from "react";
import { send } from "@/lib/client/fetcher";
import { useSend } from "@/lib/client/use-send";
import { floorAreaM2 } from "@/lib/domain/feeding-load";
import { formatNumber, lengthForDisplay, lengthToCm, M_PER_FOOT, UNIT_LABELS, type UnitSystem } from "@/lib/domain/units";
import { FieldError, INPUT_CLASS } from "@/components/ui/form-parts";
import { Mark } from "@/components/ui/marks";

export const SIZE_FIELDS = ["lengthCm", "widthCm", "depthCm"] as const;
type SizeField = (typeof SIZE_FIELDS)[number];
const LABELS: Record<SizeField, string> = { lengthCm: "Length", widthCm: "Width", depthCm: "Depth" };
// Hints only, never sent: a common storage tote of about 70 L (common practice).
const EXAMPLE: Record<UnitSystem, Record<SizeField, string>> = {
  metric: { lengthCm: "e.g. 60", widthCm: "e.g. 40", depthCm: "e.g. 30" },
  imperial: { lengthCm: "e.g. 24", widthCm: "e.g. 16", depthCm: "e.g. 12" },
};

const typed = (s: string) => (s.trim() === "" ? null : Number(s.trim().replace(",", ".")));

/** What the size inputs hold, in cm for the API: blank is null (unknown), a number is converted
 * from the farm's units, and anything else is sent as typed so the server names the field. */
export function sizeForApi(values: Record<SizeField, string>, system: UnitSystem): Record<SizeField, number | string | null> {
  const out = {} as Record<SizeField, number | string | null>;
  for (const f of SIZE_FIELDS) {
    const n = typed(values[f]);
    out[f] = n === null ? null : Number.isFinite(n) ? lengthToCm(n, system) : values[f];
  }
  return out;
}

const shown = (cm: number | null | undefined, system: UnitSystem) => (cm == null ? "" : String(Number(lengthForDisplay(cm, system).toFixed(1))));

/** The floor in words, in the farm's units. */
export function floorWords(lengthCm: number | null, widthCm: number | null, system: UnitSystem): string | null {
  const m2 = floorAreaM2(lengthCm, widthCm);
  if (m2 === null) return null;
  return system === "metric" ? `${formatNumber(m2, 2)} m²` : `${formatNumber(m2 / M_PER_FOOT ** 2, 1)} ft²`;
}

/** Length, width and depth inputs in the farm's units, with the floor they make. Controlled by the
 * caller so both the add-bin form and the Size form read the same values. */
export function BinSizeFields({
  system,
  values,
  onChange,
  errors,
}: {
  system: UnitSystem;
  values: Record<SizeField, string>;
  onChange: (v: Record<SizeField, string>) => void;
  errors: Record<string, string | undefined>;
}) {
  const id = useId();
  const unit = UNIT_LABELS[system].length;
  const cm = sizeForApi(values, system);
  const floor = floorWords(typeof cm.lengthCm === "number" ? cm.lengthCm : null, typeof cm.widthCm === "number" ? cm.widthCm : null, system);
  return (
    <fieldset className="space-y-2">
      <legend className="font-bold">Size inside the bin ({unit})</legend>
      <p className="text-sm text-soil-700">
        The floor (length × width) is what each feeding is weighed against, so a load that could heat the bed is named before it is logged. Leave blank if you
        do not know it yet.
      </p>
      <div className="grid grid-cols-3 gap-2">
        {SIZE_FIELDS.map((f) => (
          <label key={f} className="block">
            <span className="block text-sm font-bold">
              {LABELS[f]} ({unit})
            </span>
            <input
              name={f}
              inputMode="decimal"
              autoComplete="off"
              placeholder={EXAMPLE[system][f]}
              value={values[f]}
              onChange={(e) => onChange({ ...values, [f]: e.target.value })}
              aria-invalid={!!errors[f]}
              aria-describedby={errors[f] ? `${id}-${f}` : undefined}
              className={`tabular ${INPUT_CLASS}`}
            />
            <FieldError id={`${id}-${f}`} error={errors[f]} />
          </label>
        ))}
      </div>
      <p className="text-sm" aria-live="polite">
        {floor ? `Floor: ${floor}.` : "Floor: give the length and width."}
      </p>
    </fieldset>
  );
}

export const emptySize = (system: UnitSystem, size?: { lengthCm: number | null; widthCm: number | null; depthCm: number | null }) => ({
  lengthCm: shown(size?.lengthCm, system),
  widthCm: shown(size?.widthCm, system),
  depthCm: shown(size?.depthCm, system),
});

/** An owner sets or changes a bin's size (PATCH /api/bins/[binId]). */
export function BinSizeForm({
  binId,
  system,
  size,
}: {
  binId: string;
  system: UnitSystem;
  size: { lengthCm: number | null; widthCm: number | null; depthCm: number | null };
}) {
  const router = useRouter();
  const { mutate } = useSWRConfig();
  const [values, setValues] = useState(() => emptySize(system, size));
  const { busy, errors, run } = useSend();
  const [done, setDone] = useState<string | null>(null);
  const formRef = useRef<HTMLFormElement>(null);

  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setDone(null);
    const sent = await run(() => send<{ bin: { lengthCm: number | null; widthCm: number | null } }>("PATCH", `/api/bins/${binId}`, sizeForApi(values, system)));
    if (!sent.ok) {
      if (sent.field) formRef.current?.querySelector<HTMLElement>(`[name=${sent.field}]`)?.focus();
      return;
    }
    const floor = floorWords(sent.value.bin.lengthCm, sent.value.bin.widthCm, system);
    setDone(floor ? `Saved. Floor: ${floor}.` : "Saved. Without a length and width, feedings are weighed by mass alone.");
    await mutate(binKey(binId));
    router.refresh();
  }

  const formError = errors.form ?? Object.entries(errors).find(([k]) => !(SIZE_FIELDS as readonly string[]).includes(k))?.[1];
  return (
    <section id="bin-size" aria-labelledby="bin-size-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="bin-size-h" className="text-xl font-bold">
        Size
      </h2>
      <form ref={formRef} onSubmit={submit} noValidate className="mt-2 space-y-3">
        <BinSizeFields system={system} values={values} onChange={setValues} errors={errors} />
        <button disabled={busy} className="min-h-12 rounded-xl bg-leaf-700 px-4 font-bold text-white disabled:opacity-60">
          {busy ? "Saving…" : "Save the size"}
        </button>
        {formError && (
          <p className="flex items-center gap-1 text-sm text-clay-700">
            <Mark name="error" />
            {formError}
          </p>
        )}
        <p aria-live="polite" className="text-sm text-leaf-700">
          {done}
        </p>
      </form>
    </section>
  );
}
