"use client";

import { useMemo, useState } from "react";
import { useSWRConfig } from "swr";
import { clockFormat, feedingIssues, zoneWords } from "@/components/logbook/format";
import { LOG_KIND_LOOK } from "@/components/logbook/kind-look";
import { MixVerdictMark } from "@/components/logbook/mix-verdict";
import { Mark } from "@/components/ui/marks";
import { useFarmLogbook, useLogbook } from "@/lib/client/hooks/use-logbook";
import type { LogbookItem, ZoneChoice } from "@/lib/client/wire";
import { failureOf, send } from "@/lib/client/fetcher";
import { feedingsKey, isFarmLogbookKey, isTodayKey, logbookKey } from "@/lib/client/swr-keys";
import { formatMass, formatNumber, formatPercent, formatVolume, type UnitSystem } from "@/lib/domain/units";

const UNDO_MS = 24 * 3600_000;

function what(e: LogbookItem, system: UnitSystem, zoneOf: (id: string | null | undefined) => string): string {
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
    case "shift": {
      const where = `${zoneOf(e.zoneId)} → ${zoneOf(e.toZoneId)}`;
      return e.volumeL == null ? `moved ${where}` : `${formatVolume(e.volumeL, system, { digits: 1 })} moved ${where}`;
    }
  }
}

// A feeding keeps its mix check beside it: each item with its mass, and the verdict recomputed from them.
function FeedingItems({ e, system }: { e: LogbookItem; system: UnitSystem }) {
  const items = e.items ?? [];
  if (items.length === 0) return null;
  const issues = feedingIssues({ items });
  return (
    <div className="mt-1 rounded-xl bg-paper p-2 ring-1 ring-soil-300">
      <ul aria-label="Items" className="text-sm">
        {items.map((i) => (
          <li key={i.id} className="tabular flex justify-between gap-2">
            <span>{i.name}</span>
            <span>{formatMass(i.massKg, system, { digits: 2 })}</span>
          </li>
        ))}
      </ul>
      <p className="mt-1 flex flex-wrap items-center gap-1 text-sm">
        <span className="text-soil-700">Mix check:</span>
        {!issues ? (
          <MixVerdictMark verdict={null} />
        ) : issues.length === 0 ? (
          <MixVerdictMark verdict="balanced" />
        ) : (
          issues.map((w) => <MixVerdictMark key={w} verdict={w} />)
        )}
      </p>
    </div>
  );
}

type Props = {
  /** A bin's logbook (the bin page). */
  binId?: string;
  /** Or the farm's, with the page's filters as a query string (the farm logbook page). */
  farmId?: string;
  search?: string;
  /** Say which bin each entry is in (the farm-wide list). */
  showBin?: boolean;
  /** What to say when nothing is listed (e.g. that filters are on). */
  emptyWords?: string;
  zones: ZoneChoice[];
  system: UnitSystem;
  timezone: string;
  userId: string;
  isOwner: boolean;
};

// The one logbook list: every kind of entry, newest first, for a bin or for the farm; the author
// (or an owner) may undo an entry for 24 h. Each kind has its own word and mark, never colour alone.
export function LogbookList({ binId, farmId, search = "", showBin, emptyWords, zones, system, timezone, userId, isOwner }: Props) {
  const forBin = useLogbook(farmId ? null : (binId ?? null));
  const forFarm = useFarmLogbook(farmId ?? null, search);
  const entries = farmId ? forFarm.data?.entries : forBin.data?.entries;
  const error = farmId ? forFarm.error : forBin.error;
  const { mutate } = useSWRConfig();
  const clock = useMemo(() => clockFormat(timezone), [timezone]);
  const zoneOf = (id: string | null | undefined) => zoneWords(zones.find((z) => z.id === id));
  const [status, setStatus] = useState<string>("");
  const [now] = useState(() => Date.now());

  async function undo(e: LogbookItem) {
    try {
      await send("DELETE", `/api/logbook/${e.kind}/${e.id}`);
      setStatus(`${LOG_KIND_LOOK[e.kind].word} removed.`);
    } catch (err) {
      setStatus(`Not removed: ${failureOf(err).message}`);
    }
    await mutate((key) => key === logbookKey(e.binId) || key === feedingsKey(e.binId) || isFarmLogbookKey(key) || isTodayKey(key));
  }

  if (!entries) return <p className="text-soil-700">{error ? error.message : "Loading the logbook…"}</p>;
  return (
    <>
      {entries.length === 0 ? (
        <p className="rounded-xl bg-paper p-3 text-soil-700 ring-1 ring-soil-300">
          {emptyWords ?? "Nothing logged yet. Feedings, water, shifts, harvests, notes and oven-dry samples show up here as they are logged."}
        </p>
      ) : (
        <ol aria-label="Logbook, newest first" className="divide-y divide-soil-100">
          {entries.map((e) => {
            const k = LOG_KIND_LOOK[e.kind];
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
                <p className="tabular mt-1 break-words">{what(e, system, zoneOf)}</p>
                {e.kind === "feeding" && <FeedingItems e={e} system={system} />}
                <p className="text-sm text-soil-700">
                  {showBin ? `${e.binName} · ` : ""}
                  {e.kind === "shift" ? "" : `${zoneOf(e.zoneId)} · `}by {e.byName ?? "someone no longer on the farm"}
                </p>
                {e.notes && <p className="text-sm break-words italic">{e.notes}</p>}
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
