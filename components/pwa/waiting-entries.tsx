"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useCallback, useEffect, useState } from "react";
import { Mark } from "@/components/ui/marks";
import { discardEntry, listEntries, onQueueChange, sendWaiting, setQueueOwner, type WaitingEntry } from "@/lib/client/offline-queue";
import { usePageRefresh } from "@/lib/client/revalidate";

// While entries wait, they are tried again this often (besides page load and the `online` event).
const RETRY_MS = 20_000;

/** A refused entry's values, so the keeper can make it again by hand. */
function valuesWords(body: unknown): string[] {
  if (!body || typeof body !== "object") return [];
  const out: string[] = [];
  for (const [k, v] of Object.entries(body as Record<string, unknown>)) {
    if (v == null || v === "") continue;
    if (Array.isArray(v)) v.forEach((item, i) => out.push(`${k} ${i + 1}: ${valuesWords(item).join(", ")}`));
    else if (typeof v === "object") out.push(`${k}: ${valuesWords(v).join(", ")}`);
    else out.push(`${k}: ${String(v)}`);
  }
  return out;
}

const timeOf = (iso: string) => new Date(iso).toLocaleString([], { weekday: "short", hour: "2-digit", minute: "2-digit" });

/**
 * The log entries made on this phone with no signal, for this person and farm: each says it is
 * waiting, or why the server would not store it. Sends them when the signal returns (the `online`
 * event, on load, and every RETRY_MS while any wait), then refreshes what the page shows.
 */
export function WaitingEntries({ userId, farmId }: { userId: string; farmId: string }) {
  const [entries, setEntries] = useState<WaitingEntry[]>([]);
  const refresh = usePageRefresh();
  const path = usePathname();

  const reload = useCallback(() => {
    listEntries(userId, farmId)
      .then(setEntries)
      .catch((e: unknown) => console.warn("[wormward] could not read the entries kept on this phone:", e));
  }, [userId, farmId]);

  const sendNow = useCallback(async () => {
    if (!navigator.onLine) return;
    const { sent } = await sendWaiting(userId, farmId).catch((e: unknown) => {
      console.warn("[wormward] sending kept entries failed:", e);
      return { sent: [] };
    });
    if (sent.length) await refresh();
  }, [userId, farmId, refresh]);

  useEffect(() => {
    setQueueOwner(userId, farmId);
    reload();
    void sendNow();
    const off = onQueueChange(reload);
    window.addEventListener("online", sendNow);
    return () => {
      off();
      window.removeEventListener("online", sendNow);
    };
  }, [userId, farmId, reload, sendNow]);

  const waiting = entries.filter((e) => e.state !== "refused").length;
  useEffect(() => {
    if (!waiting) return;
    const t = setInterval(() => void sendNow(), RETRY_MS);
    return () => clearInterval(t);
  }, [waiting, sendNow]);

  if (entries.length === 0) return null;
  return (
    <section aria-labelledby="waiting-h" className="mx-4 mt-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="waiting-h" className="flex items-center gap-2 text-lg font-bold">
        <Mark name="toSend" />
        Waiting to send ({entries.length})
      </h2>
      <p className="text-sm text-soil-700">
        {waiting > 0
          ? "Kept on this phone. They are sent by themselves when there is signal."
          : "The server would not store these: make them again by hand, then discard them."}
      </p>
      <ul aria-label="Entries on this phone" className="mt-2 space-y-2">
        {entries.map((e) => (
          <li key={e.key} data-key={e.key} className="rounded-xl bg-paper p-3 ring-1 ring-soil-300">
            <p className="font-bold">{e.what}</p>
            <p className="text-sm text-soil-700">
              Made {timeOf(e.madeAt)}
              {e.page !== path && (
                <>
                  {" · "}
                  <Link href={e.page} className="underline underline-offset-4">
                    its page
                  </Link>
                </>
              )}
            </p>
            {e.state === "waiting" && <p className="text-sm font-bold">Waiting to send</p>}
            {e.state === "signed-out" && <p className="text-sm font-bold">Waiting to send: sign in again on this phone to send it.</p>}
            {e.state === "refused" && (
              <>
                <p className="flex items-center gap-1 text-sm font-bold text-clay-700">
                  <Mark name="error" />
                  Not stored: {e.refusal?.message}
                </p>
                {e.refusal?.status === 422 && (
                  <ul aria-label="Its values" className="mt-1 list-disc pl-5 text-sm">
                    {valuesWords(e.body).map((v) => (
                      <li key={v}>{v}</li>
                    ))}
                  </ul>
                )}
                <button type="button" onClick={() => void discardEntry(e.key)} className="mt-2 min-h-11 rounded-lg px-3 font-bold ring-1 ring-soil-500">
                  Discard
                </button>
              </>
            )}
          </li>
        ))}
      </ul>
      {waiting > 0 && (
        <button type="button" onClick={() => void sendNow()} className="mt-3 min-h-11 rounded-lg bg-soil-800 px-3 font-bold text-white">
          Send now
        </button>
      )}
    </section>
  );
}
