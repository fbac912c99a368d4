"use client";

import { useRouter } from "next/navigation";
import { useId, useRef, useState, type ReactNode } from "react";
import { send } from "@/lib/client/fetcher";
import { useTodayRefresh } from "@/lib/client/revalidate";
import { useSend } from "@/lib/client/use-send";
import type { AddedBin } from "@/lib/client/wire";
import { BIN_STYLES } from "@/lib/domain/vocabulary";
import { defaultZoneKinds, MAX_ZONES } from "@/lib/domain/validation/farm";
import { zoneName } from "@/lib/domain/zone-words";
import { FieldError, INPUT_CLASS } from "@/components/ui/form-parts";
import { Mark } from "@/components/ui/marks";
import { BinSizeFields, emptySize, SIZE_FIELDS, sizeForApi } from "@/components/bins/bin-size-form";
import type { UnitSystem } from "@/lib/domain/units";

const SPECIES = [
  ["eisenia-fetida", "Eisenia fetida / andrei (red wiggler)"],
  ["eisenia-hortensis", "Eisenia hortensis"],
  ["eudrilus-eugeniae", "Eudrilus eugeniae"],
  ["perionyx-excavatus", "Perionyx excavatus"],
] as const;

const FIELDS = ["name", "style", "species", "zoneCount", ...SIZE_FIELDS] as const;

/** A labelled select or input with its error tied to it, so a refusal reads under its own field. */
function Field({
  label,
  error,
  hint,
  children,
}: {
  label: string;
  error?: string;
  hint?: ReactNode;
  children: (a11y: { "aria-invalid": boolean; "aria-describedby"?: string }) => ReactNode;
}) {
  const errorId = useId();
  return (
    <label className="block">
      <span className="block font-bold">{label}</span>
      {hint && <span className="block text-sm text-soil-700">{hint}</span>}
      {children({ "aria-invalid": !!error, "aria-describedby": error ? errorId : undefined })}
      <FieldError id={errorId} error={error} />
    </label>
  );
}

// Owners add a bin from Today or from its own page; its zones are made from the count, feeding side
// first, and the form shows them in that order before anything is sent.
export function AddBinForm({
  farmId,
  startOpen = false,
  thenGoTo,
  heading: Heading = "h2",
  system = "metric",
}: {
  farmId: string;
  startOpen?: boolean;
  /** Where to go after the bin is added (the form's own page goes back to Today). */
  thenGoTo?: string;
  heading?: "h1" | "h2";
  /** The farm's units: the size is typed in cm or inches and stored in cm. */
  system?: UnitSystem;
}) {
  const router = useRouter();
  const refreshToday = useTodayRefresh(farmId);
  const [open, setOpen] = useState(startOpen);
  const [zoneCount, setZoneCount] = useState(3);
  const [size, setSize] = useState(() => emptySize(system));
  const { busy, errors, run } = useSend();
  const [done, setDone] = useState<string | null>(null);
  const formRef = useRef<HTMLFormElement>(null);

  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const sent = await run(() =>
      send<AddedBin>("POST", `/api/farms/${farmId}/bins`, {
        name: f.get("name"),
        style: f.get("style"),
        species: f.get("species"),
        zoneCount: Number(f.get("zoneCount")),
        ...sizeForApi(size, system),
      }),
    );
    if (!sent.ok) {
      // Take the thumb to the field the refusal names; what was typed stays in the form.
      const field = FIELDS.find((n) => n === sent.field);
      if (field) formRef.current?.querySelector<HTMLElement>(`[name=${field}]`)?.focus();
      return;
    }
    const body = sent.value;
    setDone(`Added ${body.bin.name} with ${body.bin.zones.length} zone${body.bin.zones.length === 1 ? "" : "s"}.`);
    setOpen(false);
    setSize(emptySize(system));
    await refreshToday();
    // The setup checklist on Today is drawn on the server: refresh it so "Add a bin" ticks.
    if (thenGoTo) router.push(thenGoTo);
    router.refresh();
  }

  const kinds = defaultZoneKinds(zoneCount);
  // A refusal naming a field this form does not show is said under the button, never lost.
  const formError = errors.form ?? Object.entries(errors).find(([k]) => !(FIELDS as readonly string[]).includes(k))?.[1];
  return (
    <section className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      {!open ? (
        <button
          onClick={() => {
            setOpen(true);
            setDone(null);
          }}
          className="min-h-12 rounded-xl bg-soil-800 px-4 font-bold text-white"
        >
          Add a bin
        </button>
      ) : (
        <form ref={formRef} onSubmit={submit} noValidate className="space-y-3">
          <Heading className={Heading === "h1" ? "text-3xl font-bold" : "text-lg font-bold"}>Add a bin</Heading>
          <Field label="Name" error={errors.name} hint="What the crew calls it, e.g. Porch tote.">
            {(a11y) => <input name="name" maxLength={80} autoComplete="off" className={INPUT_CLASS} {...a11y} />}
          </Field>
          <Field label="Style" error={errors.style}>
            {(a11y) => (
              <select name="style" className={INPUT_CLASS} defaultValue="tote" {...a11y}>
                {BIN_STYLES.map((s) => (
                  <option key={s}>{s}</option>
                ))}
              </select>
            )}
          </Field>
          <Field label="Species" error={errors.species} hint="Its comfortable temperature and moisture set the bin's alerts.">
            {(a11y) => (
              <select name="species" className={INPUT_CLASS} {...a11y}>
                {SPECIES.map(([v, l]) => (
                  <option key={v} value={v}>
                    {l}
                  </option>
                ))}
              </select>
            )}
          </Field>
          <Field label="Zones (feeding side to harvest side)" error={errors.zoneCount}>
            {(a11y) => (
              <select name="zoneCount" className={INPUT_CLASS} value={zoneCount} onChange={(e) => setZoneCount(Number(e.target.value))} {...a11y}>
                {Array.from({ length: MAX_ZONES }, (_, i) => i + 1).map((n) => (
                  <option key={n}>{n}</option>
                ))}
              </select>
            )}
          </Field>
          {/* The zones in the order they are made: position 1 is where food goes in. */}
          <ol aria-label="Zones in order" className="rounded-xl bg-paper p-3 text-sm">
            {kinds.map((kind, i) => (
              <li key={i} className="flex items-baseline gap-2 py-0.5">
                <span className="tabular w-5 text-right font-bold">{i + 1}</span>
                <span className="font-bold">{zoneName({ kind, name: null })}</span>
                <span className="text-soil-700">
                  {kinds.length === 1 ? "fed and harvested here" : i === 0 ? "feeding side" : i === kinds.length - 1 ? "harvest side" : ""}
                </span>
              </li>
            ))}
          </ol>
          <BinSizeFields system={system} values={size} onChange={setSize} errors={errors} />
          <div className="flex gap-2">
            <button disabled={busy} className="min-h-12 rounded-xl bg-leaf-700 px-4 font-bold text-white disabled:opacity-60">
              {busy ? "Adding…" : "Add"}
            </button>
            <button type="button" onClick={() => (thenGoTo ? router.push(thenGoTo) : setOpen(false))} className="min-h-12 rounded-xl px-4 ring-1 ring-soil-300">
              Cancel
            </button>
          </div>
          {formError && (
            <p className="flex items-center gap-1 text-sm text-clay-700">
              <Mark name="error" />
              {formError}
            </p>
          )}
        </form>
      )}
      <p aria-live="polite" className="mt-2 text-sm text-leaf-700">
        {done}
      </p>
    </section>
  );
}
