import type { ReactNode } from "react";
import { Mark } from "@/components/ui/marks";
import type { FeedingDue, HarvestEstimate } from "@/lib/domain/bin-cycle";
import { zoneName } from "@/lib/domain/zone-words";

const FEEDING_WORD: Record<FeedingDue["status"], string> = { never: "Feeding", later: "Feeding", today: "Feeding: due today", overdue: "Feeding: overdue" };
const FROM_WORDS = { bin: "this bin's own interval", farm: "the farm's interval", default: "the usual interval" } as const;

/** What the bin asks of the crew next: the feeding due or overdue, the harvest side's estimate with
 * its reasoning, and the planned harvest beside it. */
export function BinCyclePanel({
  feeding,
  interval,
  harvestSide,
  planned,
  form,
}: {
  feeding: FeedingDue;
  interval: { days: number; from: keyof typeof FROM_WORDS };
  harvestSide: { zone: { kind: string; name: string | null }; estimate: HarvestEstimate } | null;
  planned: { on: string; words: string } | null;
  form: ReactNode;
}) {
  const late = feeding.status === "overdue" || feeding.status === "today";
  const side = harvestSide?.estimate;
  const sideWord = !side ? null : side.ready ? "Ready to harvest" : side.readyOn ? "Curing" : "No date yet";
  return (
    <section aria-labelledby="next-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="next-h" className="text-xl font-bold">
        Next up
      </h2>
      <ul className="mt-2 space-y-3">
        <li data-cycle="feeding" className={late ? "rounded-xl bg-clay-100 p-2 ring-1 ring-clay-500" : ""}>
          <p className="flex items-center gap-2 font-bold">
            <Mark name="feeding" />
            {FEEDING_WORD[feeding.status]}
          </p>
          <p>{feeding.words}</p>
          <p className="text-sm text-soil-700">
            Every {interval.days} days: {FROM_WORDS[interval.from]}.
          </p>
        </li>
        {harvestSide && side && (
          <li data-cycle="harvest-side" className={side.ready ? "rounded-xl bg-leaf-100 p-2 ring-1 ring-leaf-500" : ""}>
            <p className="flex items-center gap-2 font-bold">
              <Mark name="harvest" />
              Harvest side ({zoneName(harvestSide.zone)}): {sideWord}
            </p>
            {side.lines.map((l) => (
              <p key={l}>{l}</p>
            ))}
          </li>
        )}
        {planned && (
          <li data-cycle="planned">
            <p className="flex items-center gap-2 font-bold">
              <Mark name="harvest" />
              Planned harvest
            </p>
            <p>{planned.words}</p>
          </li>
        )}
      </ul>
      {form && (
        <details className="mt-3">
          <summary className="min-h-11 cursor-pointer py-2 font-bold text-soil-700 underline underline-offset-4">
            Change the feeding interval or planned harvest
          </summary>
          {form}
        </details>
      )}
    </section>
  );
}
