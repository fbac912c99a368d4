"use client";

import { useMemo, useState } from "react";
import { clockFormat, zoneWords } from "@/components/logbook/format";
import { Mark, type MarkName } from "@/components/ui/marks";
import { useLogbook } from "@/lib/client/hooks/use-logbook";
import type { LogbookItem, ZoneChoice } from "@/lib/client/wire";
import { failureOf, send } from "@/lib/client/fetcher";
import { useBinRefresh } from "@/lib/client/revalidate";
import { formatMass, formatNumber, formatPercent, formatVolume, type UnitSystem } from "@/lib/domain/units";

// Each kind has its own word and its own mark (components/ui/marks.tsx), so the list never leans on colour alone.
const KINDS: Record<LogbookItem["kind"], { word: string; mark: MarkName; cls: string }> = {
  feeding: { word: "Feeding", cls: "bg-leaf-100 text-leaf-700", mark: "feeding" },
  watering: { word: "Water", cls: "bg-slate-100 text-slate-700", mark: "watering" },
  shift: { word: "Shift", cls: "bg-paper text-leaf-700 ring-1 ring-leaf-500", mark: "shift" },
  harvest: { word: "Harvest", cls: "bg-soil-100 text-soil-800", mark: "harvest" },
  note: { word: "Note", cls: "bg-straw-100 text-straw-800", mark: "note" },
  sample: { word: "Oven-dry sample", cls: "bg-paper text-soil-800 ring-1 ring-soil-300", mark: "ovenSample" },
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
    case "shift":
      return e.volumeL == null ? "toward the harvest side" : `${formatVolume(e.volumeL, system, { digits: 0 })} toward the harvest side`;
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
                    <Mark name={k.mark} />
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
