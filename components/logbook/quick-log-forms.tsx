"use client";

import { useState } from "react";
import { zoneWords } from "@/components/logbook/format";
import { useBinRefresh } from "@/lib/client/revalidate";
import { SAVED_ON_PHONE, useSend } from "@/lib/client/use-send";
import type { ZoneChoice } from "@/lib/client/wire";
import { massToKg, UNIT_LABELS, volumeToLitres, type UnitSystem } from "@/lib/domain/units";
import { CASTINGS_NOT_FOOD, LOCAL_CODES, WASH_HANDS } from "@/lib/domain/safety-words";
import { LogStatus } from "@/components/ui/form-parts";

type Kind = "watering" | "harvest" | "note";

const num = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(",", ".")));

const TITLES: Record<Kind, { title: string; button: string; done: string; path: string; what: string }> = {
  watering: { title: "Log water", button: "Log water", done: "Water logged.", path: "waterings", what: "Water" },
  harvest: { title: "Log harvest", button: "Log harvest", done: "Harvest logged.", path: "harvests", what: "Harvest" },
  note: { title: "Add a note", button: "Add note", done: "Note added.", path: "notes", what: "Note" },
};

// One compact form per kind: where, an amount in the farm's units (or the note's text), optional notes.
function QuickForm({ kind, binId, zones, system }: { kind: Kind; binId: string; zones: ZoneChoice[]; system: UnitSystem }) {
  const refresh = useBinRefresh(binId);
  const [zoneId, setZoneId] = useState("");
  const [amount, setAmount] = useState("");
  const [notes, setNotes] = useState("");
  const { busy, errors, setErrors, log } = useSend();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const t = TITLES[kind];
  const unit = kind === "watering" ? UNIT_LABELS[system].volume : UNIT_LABELS[system].mass;
  const field = kind === "watering" ? "litres" : kind === "harvest" ? "massKg" : "text";
  const id = (f: string) => `${kind}-${f}`;

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setStatus(null);
    let value: number | string = amount.trim();
    if (kind !== "note") {
      const n = num(amount);
      if (!Number.isFinite(n) || n <= 0) {
        setErrors({ [field]: `Give an amount above 0 ${unit}.` });
        setStatus({ ok: false, text: "Not logged: check the amount." });
        return;
      }
      value = kind === "watering" ? volumeToLitres(n, system) : massToKg(n, system);
    }
    const where = zoneWords(zones.find((z) => z.id === zoneId));
    const sent = await log({
      url: `/api/bins/${binId}/${t.path}`,
      body: { zoneId: zoneId || null, notes: kind === "note" ? null : notes.trim() || null, [field]: value },
      binId,
      what: `${t.what} · ${kind === "note" ? amount.trim().slice(0, 40) : `${amount.trim()} ${unit}`} · ${where}`,
    });
    if (!sent.ok) return setStatus({ ok: false, text: `Not logged: ${sent.message}` });
    setAmount("");
    setNotes("");
    setStatus({ ok: true, text: sent.kept ? SAVED_ON_PHONE : t.done });
    await refresh();
  }

  const input = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg";
  return (
    <form onSubmit={submit} noValidate aria-labelledby={id("h")} className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id={id("h")} className="text-xl font-bold">
        {t.title}
      </h2>
      <div className="grid grid-cols-2 gap-3">
        <div className={kind === "note" ? "col-span-2" : ""}>
          <label htmlFor={id("zone")} className="block font-bold">
            Where
          </label>
          <select id={id("zone")} value={zoneId} onChange={(e) => setZoneId(e.target.value)} aria-invalid={!!errors.zoneId} className={input}>
            <option value="">Whole bin</option>
            {zones.map((z) => (
              <option key={z.id} value={z.id}>
                {zoneWords(z)}
              </option>
            ))}
          </select>
          {errors.zoneId && <p className="mt-1 text-sm font-bold text-clay-700">{errors.zoneId}</p>}
        </div>
        {kind !== "note" && (
          <div>
            <label htmlFor={id("amount")} className="block font-bold">
              {kind === "watering" ? "Water" : "Castings"} ({unit})
            </label>
            <input
              id={id("amount")}
              inputMode="decimal"
              value={amount}
              onChange={(e) => setAmount(e.target.value)}
              aria-invalid={!!errors[field]}
              aria-describedby={errors[field] ? id("amount-error") : undefined}
              className={`${input} tabular`}
            />
            {errors[field] && (
              <p id={id("amount-error")} className="mt-1 text-sm font-bold text-clay-700">
                {errors[field]}
              </p>
            )}
          </div>
        )}
      </div>
      {kind === "note" ? (
        <div>
          <label htmlFor={id("text")} className="block font-bold">
            Note
          </label>
          <textarea
            id={id("text")}
            value={amount}
            onChange={(e) => setAmount(e.target.value)}
            rows={2}
            aria-invalid={!!errors.text}
            aria-describedby={errors.text ? id("text-error") : undefined}
            className="w-full rounded-xl border border-soil-300 bg-paper p-3"
          />
          {errors.text && (
            <p id={id("text-error")} className="mt-1 text-sm font-bold text-clay-700">
              {errors.text}
            </p>
          )}
        </div>
      ) : (
        <div>
          <label htmlFor={id("notes")} className="block font-bold">
            Notes (optional)
          </label>
          <input id={id("notes")} value={notes} onChange={(e) => setNotes(e.target.value)} className={input} />
        </div>
      )}
      {kind === "harvest" && (
        <aside aria-label="Caution" className="rounded-xl bg-straw-100 p-3 text-sm ring-1 ring-straw-600">
          <p className="font-bold">Careful</p>
          <ul className="list-disc pl-5">
            <li>{CASTINGS_NOT_FOOD}</li>
            <li>{WASH_HANDS}</li>
            <li>{LOCAL_CODES}</li>
          </ul>
        </aside>
      )}
      {kind === "watering" && <p className="text-sm text-soil-700">Add water a little at a time: a soggy bed starves the worms of air.</p>}
      <button disabled={busy} className="min-h-12 w-full rounded-xl bg-leaf-700 px-4 text-lg font-bold text-white disabled:opacity-60">
        {busy ? "Logging…" : t.button}
      </button>
      <LogStatus status={status} />
    </form>
  );
}

export function QuickLogForms(props: { binId: string; zones: ZoneChoice[]; system: UnitSystem }) {
  return (
    <div className="space-y-4">
      <QuickForm kind="watering" {...props} />
      <QuickForm kind="harvest" {...props} />
      <QuickForm kind="note" {...props} />
    </div>
  );
}
