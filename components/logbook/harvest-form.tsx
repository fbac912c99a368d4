"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { zoneWords } from "@/components/logbook/format";
import { useLogDone } from "@/components/logbook/log-action";
import { INPUT, LogFormFrame, num, NumberField, ZoneSelect } from "@/components/logbook/log-form-parts";
import { useBinRefresh } from "@/lib/client/revalidate";
import { SAVED_ON_PHONE, useSend } from "@/lib/client/use-send";
import type { ZoneChoice } from "@/lib/client/wire";
import { massToKg, UNIT_LABELS, type UnitSystem } from "@/lib/domain/units";
import { CASTINGS_NOT_FOOD, LOCAL_CODES, WASH_HANDS } from "@/lib/domain/safety-words";

/** Castings taken out: where (the harvest side by default), their mass in the farm's units, optional notes. */
export function HarvestForm({ binId, zones, system }: { binId: string; zones: ZoneChoice[]; system: UnitSystem }) {
  const refresh = useBinRefresh(binId);
  const router = useRouter();
  const done = useLogDone();
  const [zoneId, setZoneId] = useState(zones.findLast((z) => z.kind === "curing")?.id ?? "");
  const [amount, setAmount] = useState("");
  const [notes, setNotes] = useState("");
  const { busy, errors, setErrors, log } = useSend();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const unit = UNIT_LABELS[system].mass;

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setStatus(null);
    const n = num(amount);
    if (!Number.isFinite(n) || n <= 0) {
      setErrors({ massKg: `Give an amount above 0 ${unit}.` });
      return setStatus({ ok: false, text: "Not logged: check the amount." });
    }
    const sent = await log({
      url: `/api/bins/${binId}/harvests`,
      body: { zoneId: zoneId || null, notes: notes.trim() || null, massKg: massToKg(n, system) },
      binId,
      what: `Harvest · ${amount.trim()} ${unit} · ${zoneWords(zones.find((z) => z.id === zoneId))}`,
    });
    if (!sent.ok) return setStatus({ ok: false, text: `Not logged: ${sent.message}` });
    setAmount("");
    setNotes("");
    const said = sent.kept ? SAVED_ON_PHONE : "Harvest logged.";
    setStatus({ ok: true, text: said });
    await refresh();
    // The yields chart is drawn on the server.
    router.refresh();
    // Kept on the phone: the form stays open with its answer, since closing it would load a page with no signal.
    if (!sent.kept) done(said);
  }

  return (
    <LogFormFrame id="harvest" title="Log harvest" button="Log harvest" busy={busy} status={status} onSubmit={submit}>
      <div className="grid grid-cols-2 gap-3">
        <ZoneSelect id="harvest-zone" zones={zones} value={zoneId} onChange={setZoneId} error={errors.zoneId} />
        <NumberField id="harvest-amount" label={`Castings (${unit})`} value={amount} onChange={setAmount} error={errors.massKg} />
      </div>
      <div>
        <label htmlFor="harvest-notes" className="block font-bold">
          Notes (optional)
        </label>
        <input id="harvest-notes" value={notes} onChange={(e) => setNotes(e.target.value)} className={INPUT} />
      </div>
      <aside aria-label="Caution" className="rounded-xl bg-straw-100 p-3 text-sm ring-1 ring-straw-600">
        <p className="font-bold">Careful</p>
        <ul className="list-disc pl-5">
          <li>{CASTINGS_NOT_FOOD}</li>
          <li>{WASH_HANDS}</li>
          <li>{LOCAL_CODES}</li>
        </ul>
      </aside>
    </LogFormFrame>
  );
}
