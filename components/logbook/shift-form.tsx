"use client";

import { useState } from "react";
import { zoneWords } from "@/components/logbook/format";
import { useLogDone } from "@/components/logbook/log-action";
import { LogStatus } from "@/components/ui/form-parts";
import { useBinRefresh } from "@/lib/client/revalidate";
import { SAVED_ON_PHONE, useSend } from "@/lib/client/use-send";
import type { LoggedShift, ZoneChoice } from "@/lib/client/wire";
import { UNIT_LABELS, volumeToLitres, type UnitSystem } from "@/lib/domain/units";
import { WASH_HANDS } from "@/lib/domain/safety-words";

const num = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(",", ".")));
const INPUT = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg";

// Material moved from one zone of the bin to another, usually a step toward the harvest side; the
// amount is an estimate in the farm's units and may be left out. Zones come ordered from the
// feeding side, so the form starts with the first zone moving to the next.
export function ShiftForm({ binId, zones, system }: { binId: string; zones: ZoneChoice[]; system: UnitSystem }) {
  const refresh = useBinRefresh(binId);
  const done = useLogDone();
  const [from, setFrom] = useState(zones[0]?.id ?? "");
  const [to, setTo] = useState(zones[1]?.id ?? "");
  const [amount, setAmount] = useState("");
  const [notes, setNotes] = useState("");
  const { busy, errors, setErrors, log } = useSend();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const unit = UNIT_LABELS[system].volume;

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setStatus(null);
    const n = num(amount);
    if (amount.trim() !== "" && (!Number.isFinite(n) || n <= 0)) {
      setErrors({ volumeL: `Give an amount above 0 ${unit}, or leave it empty.` });
      return setStatus({ ok: false, text: "Not logged: check the amount." });
    }
    if (from === to) {
      setErrors({ toZoneId: "Pick two different zones: material moves from one to another." });
      return setStatus({ ok: false, text: "Not logged: pick two different zones." });
    }
    const sent = await log<LoggedShift>({
      url: `/api/bins/${binId}/shifts`,
      body: { zoneId: from, toZoneId: to, volumeL: amount.trim() === "" ? null : volumeToLitres(n, system), notes: notes.trim() || null },
      binId,
      what: `Shift · ${zoneWords(zones.find((z) => z.id === from))} → ${zoneWords(zones.find((z) => z.id === to))}`,
    });
    if (!sent.ok) return setStatus({ ok: false, text: `Not logged: ${sent.message}` });
    setAmount("");
    setNotes("");
    const said = sent.kept ? SAVED_ON_PHONE : "Shift logged.";
    setStatus({ ok: true, text: said });
    await refresh();
    // Kept on the phone: the form stays open with its answer, since closing it would load a page with no signal.
    if (!sent.kept) done(said);
  }

  if (zones.length < 2)
    return (
      <section aria-labelledby="shift-h" className="space-y-2 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 id="shift-h" className="text-xl font-bold">
          Log a shift
        </h2>
        <p className="text-soil-700">A shift moves material between zones; this bin has only one zone. An owner can add zones on the bin&apos;s settings.</p>
      </section>
    );

  const zoneSelect = (id: string, label: string, value: string, set: (v: string) => void, field: "zoneId" | "toZoneId") => (
    <div>
      <label htmlFor={id} className="block font-bold">
        {label}
      </label>
      <select
        id={id}
        value={value}
        onChange={(e) => set(e.target.value)}
        aria-invalid={!!errors[field]}
        aria-describedby={errors[field] ? `${id}-error` : undefined}
        className={INPUT}
      >
        {zones.map((z) => (
          <option key={z.id} value={z.id}>
            {zoneWords(z)}
          </option>
        ))}
      </select>
      {errors[field] && (
        <p id={`${id}-error`} className="mt-1 text-sm font-bold text-clay-700">
          {errors[field]}
        </p>
      )}
    </div>
  );

  return (
    <form onSubmit={submit} noValidate aria-labelledby="shift-h" className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="shift-h" className="text-xl font-bold">
        Log a shift
      </h2>
      <div className="grid grid-cols-2 gap-3">
        {zoneSelect("shift-from", "From", from, setFrom, "zoneId")}
        {zoneSelect("shift-to", "To", to, setTo, "toZoneId")}
      </div>
      <div>
        <label htmlFor="shift-amount" className="block font-bold">
          Moved ({unit}, optional)
        </label>
        <input
          id="shift-amount"
          inputMode="decimal"
          value={amount}
          onChange={(e) => setAmount(e.target.value)}
          aria-invalid={!!errors.volumeL}
          aria-describedby={errors.volumeL ? "shift-amount-error" : undefined}
          className={`${INPUT} tabular`}
        />
        {errors.volumeL && (
          <p id="shift-amount-error" className="mt-1 text-sm font-bold text-clay-700">
            {errors.volumeL}
          </p>
        )}
      </div>
      <div>
        <label htmlFor="shift-notes" className="block font-bold">
          Notes (optional)
        </label>
        <input id="shift-notes" value={notes} onChange={(e) => setNotes(e.target.value)} className={INPUT} />
      </div>
      <p className="text-sm text-soil-700">{WASH_HANDS}</p>
      {errors.form && <p className="text-sm font-bold text-clay-700">{errors.form}</p>}
      <button disabled={busy} className="min-h-12 w-full rounded-xl bg-leaf-700 px-4 text-lg font-bold text-white disabled:opacity-60">
        {busy ? "Logging…" : "Log shift"}
      </button>
      <LogStatus status={status} />
    </form>
  );
}
