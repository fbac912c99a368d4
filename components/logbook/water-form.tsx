"use client";

import { useState } from "react";
import { zoneWords } from "@/components/logbook/format";
import { useLogDone } from "@/components/logbook/log-action";
import { INPUT, LogFormFrame, num, NumberField, ZoneSelect } from "@/components/logbook/log-form-parts";
import { useBinRefresh } from "@/lib/client/revalidate";
import { SAVED_ON_PHONE, useSend } from "@/lib/client/use-send";
import type { ZoneChoice } from "@/lib/client/wire";
import { UNIT_LABELS, volumeToLitres, type UnitSystem } from "@/lib/domain/units";

/** Water added to the bin: where, how much in the farm's units, optional notes. */
export function WaterForm({ binId, zones, system }: { binId: string; zones: ZoneChoice[]; system: UnitSystem }) {
  const refresh = useBinRefresh(binId);
  const done = useLogDone();
  const [zoneId, setZoneId] = useState("");
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
    if (!Number.isFinite(n) || n <= 0) {
      setErrors({ litres: `Give an amount above 0 ${unit}.` });
      return setStatus({ ok: false, text: "Not logged: check the amount." });
    }
    const sent = await log({
      url: `/api/bins/${binId}/waterings`,
      body: { zoneId: zoneId || null, notes: notes.trim() || null, litres: volumeToLitres(n, system) },
      binId,
      what: `Water · ${amount.trim()} ${unit} · ${zoneWords(zones.find((z) => z.id === zoneId))}`,
    });
    if (!sent.ok) return setStatus({ ok: false, text: `Not logged: ${sent.message}` });
    setAmount("");
    setNotes("");
    const said = sent.kept ? SAVED_ON_PHONE : "Water logged.";
    setStatus({ ok: true, text: said });
    await refresh();
    // Kept on the phone: the form stays open with its answer, since closing it would load a page with no signal.
    if (!sent.kept) done(said);
  }

  return (
    <LogFormFrame id="watering" title="Log water" button="Log water" busy={busy} status={status} onSubmit={submit}>
      <div className="grid grid-cols-2 gap-3">
        <ZoneSelect id="watering-zone" zones={zones} value={zoneId} onChange={setZoneId} error={errors.zoneId} />
        <NumberField id="watering-amount" label={`Water (${unit})`} value={amount} onChange={setAmount} error={errors.litres} />
      </div>
      <div>
        <label htmlFor="watering-notes" className="block font-bold">
          Notes (optional)
        </label>
        <input id="watering-notes" value={notes} onChange={(e) => setNotes(e.target.value)} className={INPUT} />
      </div>
      <p className="text-sm text-soil-700">Add water a little at a time: a soggy bed starves the worms of air.</p>
    </LogFormFrame>
  );
}
