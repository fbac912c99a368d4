"use client";

import { useRouter } from "next/navigation";
import { useId, useState } from "react";
import { LogStatus } from "@/components/ui/form-parts";
import { failureOf, send } from "@/lib/client/fetcher";

type Status = { ok: boolean; text: string } | null;

// What a keeper or owner does from the alert's page: claim it, hand a claim back, or settle it
// with a note. The server checks the session and the role on each; the page shows the answer.
export function AlertActions({ alertId, state, claimedByMe }: { alertId: string; state: "raised" | "claimed"; claimedByMe: boolean }) {
  const router = useRouter();
  const noteId = useId();
  const [status, setStatus] = useState<Status>(null);
  const [busy, setBusy] = useState(false);
  const [note, setNote] = useState("");

  async function act(path: "claim" | "release" | "settle", done: string, body?: unknown) {
    setBusy(true);
    try {
      await send("POST", `/api/alerts/${alertId}/${path}`, body);
      setStatus({ ok: true, text: done });
      if (path === "settle") setNote("");
    } catch (err) {
      setStatus({ ok: false, text: failureOf(err).message });
    } finally {
      setBusy(false);
      router.refresh();
    }
  }

  const button = "min-h-12 rounded-xl px-4 font-bold disabled:opacity-60";
  return (
    <section aria-labelledby="act-h" className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="act-h" className="text-xl font-bold">
        What to do
      </h2>
      <div className="flex flex-wrap gap-2">
        {state === "raised" ? (
          <button type="button" disabled={busy} onClick={() => act("claim", "Claimed: you are on it.")} className={`${button} bg-soil-800 text-white`}>
            I&apos;m on it
          </button>
        ) : (
          <button
            type="button"
            disabled={busy}
            onClick={() => act("release", "Claim released: the alert is open for anyone to claim.")}
            className={`${button} bg-paper ring-1 ring-soil-700`}
          >
            {claimedByMe ? "Release my claim" : "Release the claim"}
          </button>
        )}
      </div>
      <form
        onSubmit={(e) => {
          e.preventDefault();
          void act("settle", "Settled.", note.trim() ? { note: note.trim() } : {});
        }}
        className="space-y-2"
      >
        <label htmlFor={noteId} className="block font-bold">
          Settle with a note
        </label>
        <span className="block text-sm text-soil-700">What you found or did, for whoever reads this alert later (up to 500 characters).</span>
        <textarea
          id={noteId}
          name="note"
          value={note}
          maxLength={500}
          onChange={(e) => setNote(e.target.value)}
          rows={3}
          className="w-full rounded-xl border border-soil-300 bg-paper p-3 text-lg"
        />
        <button disabled={busy} className={`${button} w-full bg-leaf-700 text-white`}>
          Settle this alert
        </button>
      </form>
      <LogStatus status={status} />
    </section>
  );
}
