"use client";

import { useMemo, useState } from "react";
import { clockFormat, zoneWords } from "@/components/logbook/format";
import { useLogbook } from "@/lib/client/hooks/use-logbook";
import type { LogbookItem, ZoneChoice } from "@/lib/client/wire";
import { failureOf, send } from "@/lib/client/fetcher";
import { useBinRefresh } from "@/lib/client/revalidate";
import { formatMass, formatNumber, formatPercent, formatVolume, type UnitSystem } from "@/lib/domain/units";

// Each kind has its own word and its own shape, so the list never leans on colour alone.
const KINDS: Record<LogbookItem["kind"], { word: string; shape: React.ReactNode; cls: string }> = {
  feeding: { word: "Feeding", cls: "bg-leaf-100 text-leaf-700", shape: <path d="M1 11 6 1l5 10Z" /> },
  watering: { word: "Water", cls: "bg-slate-100 text-slate-700", shape: <path d="M6 0.5C8 4 10.5 6 10.5 8a4.5 4.5 0 0 1-9 0C1.5 6 4 4 6 0.5Z" /> },
  harvest: { word: "Harvest", cls: "bg-soil-100 text-soil-800", shape: <rect x="1" y="1" width="10" height="10" rx="1" /> },
  note: { word: "Note", cls: "bg-straw-100 text-straw-800", shape: <path d="M1 2h10v2H1zM1 5h10v2H1zM1 8h7v2H1z" /> },
  sample: {
    word: "Oven-dry sample",
    cls: "bg-clay-100 text-clay-700",
    shape: <circle cx="6" cy="6" r="4.5" fill="none" stroke="currentColor" strokeWidth="2" />,
  },
};

const UNDO_MS = 24 * 3600_000;

function what(e: LogbookItem, system: UnitSystem): string {
  switch (e.kind) {
    case "watering":
      return e.litres == null ? "" : formatVolume(e.litres, system, { digits: 1 });
    case "harvest":
      return e.massKg == null ? "" : `${formatMass(e.massKg, system, { digits: 2 })} of castings`;
    case "feeding":
      return [
        e.massKg != null ? formatMass(e.massKg, system, { digits: 2 }) : null,
        e.mixMoisturePct != null ? `moisture ${formatPercent(e.mixMoisturePct, { digits: 1 })}` : null,
        e.mixCn != null ? `C:N ${formatNumber(e.mixCn, 1)}` : null,
      ]
        .filter(Boolean)
        .join(" · ");
    case "sample":
      return `${e.moistureWbPct == null ? "—" : formatPercent(e.moistureWbPct, { digits: 1 })} moisture (wet basis)${e.rawReading != null ? ` · probe raw ${formatNumber(e.rawReading, 0)}` : ""}`;
    case "note":
      return e.text ?? "";
  }
}

// The bin's whole logbook, newest first; the author (or an owner) may undo an entry for 24 h.
export function LogbookList({
  binId,
  zones,
  system,
  timezone,
  userId,
  isOwner,
}: {
  binId: string;
  zones: ZoneChoice[];
  system: UnitSystem;
  timezone: string;
  userId: string;
  isOwner: boolean;
}) {
  const { data, error } = useLogbook(binId);
  const refresh = useBinRefresh(binId);
  const clock = useMemo(() => clockFormat(timezone), [timezone]);
  const [status, setStatus] = useState<string>("");
  const [now] = useState(() => Date.now());
  async function undo(e: LogbookItem) {
    try {
      await send("DELETE", `/api/logbook/${e.kind}/${e.id}`);
      setStatus(`${KINDS[e.kind].word} removed.`);
    } catch (err) {
      setStatus(`Not removed: ${failureOf(err).message}`);
    }
    await refresh();
  }

  if (!data) return <p className="text-soil-700">{error ? error.message : "Loading the logbook…"}</p>;
  return (
    <>
      {data.entries.length === 0 ? (
        <p className="text-soil-700">Nothing logged yet.</p>
      ) : (
        <ol aria-label="Logbook, newest first" className="divide-y divide-soil-100">
          {data.entries.map((e) => {
            const k = KINDS[e.kind];
            const mayUndo = isOwner || (e.byUserId === userId && now - Date.parse(e.createdAt) < UNDO_MS);
            return (
              <li key={`${e.kind}-${e.id}`} className="py-2" data-kind={e.kind} data-entry-id={e.id}>
                <div className="flex flex-wrap items-baseline justify-between gap-x-2">
                  <span className={`inline-flex items-center gap-1 rounded-full px-2 py-0.5 text-sm font-bold ${k.cls}`}>
                    <svg viewBox="0 0 12 12" width="12" height="12" aria-hidden="true" fill="currentColor">
                      {k.shape}
                    </svg>
                    {k.word}
                  </span>
                  <span className="tabular text-sm text-soil-700">{clock(e.at)}</span>
                </div>
                <p className="tabular mt-1">{what(e, system)}</p>
                <p className="text-sm text-soil-700">
                  {zoneWords(zones.find((z) => z.id === e.zoneId))} · by {e.byName ?? "someone no longer on the farm"}
                </p>
                {e.notes && <p className="text-sm italic">{e.notes}</p>}
                {mayUndo && (
                  <button type="button" onClick={() => undo(e)} className="mt-1 min-h-11 rounded-lg px-3 text-sm ring-1 ring-soil-300">
                    Undo
                    <span className="sr-only">
                      {" "}
                      {k.word.toLowerCase()} of {clock(e.at)}
                    </span>
                  </button>
                )}
              </li>
            );
          })}
        </ol>
      )}
      <p role="status" aria-live="polite" className="min-h-6 text-sm font-bold">
        {status}
      </p>
    </>
  );
}
