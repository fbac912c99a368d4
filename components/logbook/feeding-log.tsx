"use client";

import { useMemo } from "react";
import { clockFormat, feedingIssues, zoneWords } from "@/components/logbook/format";
import { MixVerdictMark } from "@/components/logbook/mix-verdict";
import { useFeedings } from "@/lib/client/hooks/use-feedings";
import type { ZoneChoice } from "@/lib/client/wire";
import { formatMass, formatNumber, formatPercent, type UnitSystem } from "@/lib/domain/units";

// A bin's feedings, newest first: where, items, total, the mix check kept with it, who and when.
export function FeedingLog({ binId, zones, system, timezone }: { binId: string; zones: ZoneChoice[]; system: UnitSystem; timezone: string }) {
  const { data, error } = useFeedings(binId);
  const clock = useMemo(() => clockFormat(timezone), [timezone]);
  if (!data) return <p className="text-soil-700">{error ? error.message : "Loading feedings…"}</p>;
  if (data.feedings.length === 0) return <p className="text-soil-700">No feedings logged yet.</p>;
  return (
    <ol aria-label="Feedings, newest first" className="space-y-3">
      {data.feedings.map((f) => {
        const kg = f.totalKg ?? f.items.reduce((s, i) => s + i.massKg, 0);
        return (
          <li key={f.id} className="rounded-xl bg-paper p-3 ring-1 ring-soil-300" data-feeding-id={f.id}>
            <div className="flex flex-wrap items-baseline justify-between gap-x-2">
              <h3 className="font-bold">{zoneWords(zones.find((z) => z.id === f.zoneId))}</h3>
              <span className="tabular text-sm text-soil-700">{clock(f.at)}</span>
            </div>
            <ul className="mt-1 text-sm">
              {f.items.map((i) => (
                <li key={i.id} className="tabular flex justify-between gap-2">
                  <span>{i.name}</span>
                  <span>{formatMass(i.massKg, system, { digits: 2 })}</span>
                </li>
              ))}
            </ul>
            <p className="tabular mt-2 flex flex-wrap gap-x-3 border-t border-soil-300 pt-2 text-sm">
              <span>
                <b>{formatMass(kg, system, { digits: 2 })}</b> in all
              </span>
              <span>
                moisture <b>{f.mixMoisturePct == null ? "—" : formatPercent(f.mixMoisturePct, { digits: 1 })}</b>
              </span>
              <span>
                C:N <b>{f.mixCn == null ? "—" : formatNumber(f.mixCn, 1)}</b>
              </span>
            </p>
            <div className="mt-1 flex flex-wrap items-center justify-between gap-2">
              <span className="flex flex-wrap gap-1">
                {(() => {
                  const issues = feedingIssues(f);
                  if (!issues) return <MixVerdictMark verdict={null} />;
                  return issues.length === 0 ? <MixVerdictMark verdict="balanced" /> : issues.map((w) => <MixVerdictMark key={w} verdict={w} />);
                })()}
              </span>
              <span className="text-sm text-soil-700">by {f.byName ?? "someone no longer on the farm"}</span>
            </div>
            {f.notes && <p className="mt-1 text-sm italic">{f.notes}</p>}
          </li>
        );
      })}
    </ol>
  );
}
