"use client";

import { useState } from "react";
import { useLogDone } from "@/components/logbook/log-action";
import { FieldError, LogFormFrame, ZoneSelect } from "@/components/logbook/log-form-parts";
import { send } from "@/lib/client/fetcher";
import { useBinRefresh } from "@/lib/client/revalidate";
import { useSend } from "@/lib/client/use-send";
import type { ZoneChoice } from "@/lib/client/wire";

/** A note on the bin or one zone. */
export function NoteForm({ binId, zones }: { binId: string; zones: ZoneChoice[] }) {
  const refresh = useBinRefresh(binId);
  const done = useLogDone();
  const [zoneId, setZoneId] = useState("");
  const [text, setText] = useState("");
  const { busy, errors, setErrors, run } = useSend();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setStatus(null);
    const sent = await run(() => send("POST", `/api/bins/${binId}/notes`, { zoneId: zoneId || null, text: text.trim() }));
    if (!sent.ok) return setStatus({ ok: false, text: `Not logged: ${sent.message}` });
    setText("");
    setStatus({ ok: true, text: "Note added." });
    await refresh();
    done("Note added.");
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
