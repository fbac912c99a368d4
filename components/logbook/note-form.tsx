"use client";

import { useState } from "react";
import { zoneWords } from "@/components/logbook/format";
import { useLogDone } from "@/components/logbook/log-action";
import { FieldError, LogFormFrame, ZoneSelect } from "@/components/logbook/log-form-parts";
import { useBinRefresh } from "@/lib/client/revalidate";
import { SAVED_ON_PHONE, useSend } from "@/lib/client/use-send";
import type { ZoneChoice } from "@/lib/client/wire";

/** A note on the bin or one zone. */
export function NoteForm({ binId, zones }: { binId: string; zones: ZoneChoice[] }) {
  const refresh = useBinRefresh(binId);
  const done = useLogDone();
  const [zoneId, setZoneId] = useState("");
  const [text, setText] = useState("");
  const { busy, errors, setErrors, log } = useSend();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setStatus(null);
    const sent = await log({
      url: `/api/bins/${binId}/notes`,
      body: { zoneId: zoneId || null, text: text.trim() },
      binId,
      what: `Note · ${text.trim().slice(0, 40)} · ${zoneWords(zones.find((z) => z.id === zoneId))}`,
    });
    if (!sent.ok) return setStatus({ ok: false, text: `Not logged: ${sent.message}` });
    setText("");
    const said = sent.kept ? SAVED_ON_PHONE : "Note added.";
    setStatus({ ok: true, text: said });
    await refresh();
    // Kept on the phone: the form stays open with its answer, since closing it would load a page with no signal.
    if (!sent.kept) done(said);
  }

  return (
    <LogFormFrame id="note" title="Add a note" button="Add note" busy={busy} status={status} onSubmit={submit}>
      <ZoneSelect id="note-zone" zones={zones} value={zoneId} onChange={setZoneId} error={errors.zoneId} />
      <div>
        <label htmlFor="note-text" className="block font-bold">
          Note
        </label>
        <textarea
          id="note-text"
          value={text}
          onChange={(e) => setText(e.target.value)}
          rows={3}
          aria-invalid={!!errors.text}
          aria-describedby={errors.text ? "note-text-error" : undefined}
          className="w-full rounded-xl border border-soil-300 bg-paper p-3"
        />
        <FieldError id="note-text-error" error={errors.text} />
      </div>
    </LogFormFrame>
  );
}
