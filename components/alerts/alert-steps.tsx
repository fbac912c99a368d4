import { Mark, type MarkName } from "@/components/ui/marks";
import { clockFormat } from "@/components/logbook/format";

export type AlertStep = { id: number; type: string; at: string; words: string; after: string };

const MARKS: Partial<Record<string, MarkName>> = { raised: "raised", claimed: "claimed", settled: "done", escalated: "actNow" };

// What happened to an alert, in order: each step's time, its words, and how long after the raise.
export function AlertSteps({ steps, timezone }: { steps: AlertStep[]; timezone: string }) {
  const clock = clockFormat(timezone);
  return (
    <section aria-labelledby="steps-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="steps-h" className="text-xl font-bold">
        What happened
      </h2>
      {steps.length === 0 ? (
        <p className="mt-1">Nothing is recorded for this alert yet.</p>
      ) : (
        <ol className="mt-2 space-y-2" aria-label="Events, oldest first">
          {steps.map((s) => {
            const mark = MARKS[s.type];
            return (
              <li key={`${s.id}-${s.type}`} data-event={s.type} className="border-t border-soil-100 pt-2 first:border-t-0 first:pt-0">
                <p className="flex items-center gap-1.5 font-bold">
                  {mark && <Mark name={mark} />}
                  {s.words}
                </p>
                <p className="tabular text-sm text-soil-700">
                  {clock(s.at)}
                  {s.type === "raised" ? "" : ` · ${s.after} after raised`}
                </p>
              </li>
            );
          })}
        </ol>
      )}
    </section>
  );
}
