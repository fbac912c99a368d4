import type { ReactNode } from "react";
import { Mark } from "@/components/ui/marks";
import { KIND_WORDS, type ChartMark } from "./chart-kit";

/** A line's words where it has no point at the cursor. */
export const NO_READING = "no reading";

/** What the cursor points at, in words: when, each line's value, and the logbook marks there. */
export type CursorWords = {
  when: string;
  rows: { name: string | null; swatch?: ReactNode; value: string; range: string | null }[];
  near: ChartMark[];
};

// The cursor's words above the plot, large enough to read at arm's length with a finger on the
// chart (a tooltip under the finger would be hidden by it). Its height is held, so the plot does
// not move under the finger when the words change. With no cursor it says `idle`.
export function CursorLegend({ cursor, idle, minHeight }: { cursor: CursorWords | null; idle: ReactNode; minHeight: string }) {
  return (
    <div className={`mt-2 rounded-xl bg-paper px-3 py-2 ring-1 ring-soil-300 ${minHeight}`} data-chart-legend>
      <p aria-live="polite" className="tabular text-soil-900">
        {cursor ? (
          <>
            <span className="block text-base font-bold text-soil-800" data-cursor-when>
              {cursor.when}
            </span>
            {cursor.rows.map((r, k) => (
              <span key={k} className="flex flex-wrap items-baseline gap-x-2" data-cursor-row>
                {r.swatch}
                {r.name && <span className="text-base">{r.name}</span>}
                <span className={r.value === NO_READING ? "text-base text-soil-700" : "text-2xl font-bold"}>{r.value}</span>
                {r.range && <span className="text-sm text-soil-700">{r.range}</span>}
              </span>
            ))}
            {cursor.near.map((m) => (
              <span key={m.id} className="mt-1 flex items-start gap-1.5 text-base" data-cursor-mark={m.kind ?? "feeding"}>
                <Mark name={m.kind ?? "feeding"} size={18} className="mt-0.5" />
                <span>
                  <b>{KIND_WORDS[m.kind ?? "feeding"].one}</b> {m.detail}
                </span>
              </span>
            ))}
          </>
        ) : (
          idle
        )}
      </p>
    </div>
  );
}

/** The logbook marks as buttons on the time axis, one list per kind; tapping one says what was done. */
export function MarkButtons(p: {
  marks: readonly ChartMark[];
  title: string;
  picked: string | null;
  onPick: (id: string) => void;
  x: (t: number) => number;
  top: number;
}) {
  const kinds = [...new Set(p.marks.map((m) => m.kind ?? "feeding"))];
  return kinds.map((kind) => (
    <ul
      key={kind}
      aria-label={`${KIND_WORDS[kind].many.replace(/^./, (c) => c.toUpperCase())} on the ${p.title.toLowerCase()} chart`}
      className="pointer-events-none absolute inset-0"
    >
      {p.marks
        .filter((m) => (m.kind ?? "feeding") === kind)
        .map((m) => {
          const on = m.id === p.picked;
          // Drawn only in the browser (after the plot is measured), so React sets this style from
          // script, which the content security policy allows, unlike a style attribute in HTML.
          return (
            <li key={m.id} className="absolute" style={{ left: p.x(m.t) - 22, top: p.top }}>
              <button
                type="button"
                aria-label={m.label}
                aria-pressed={on}
                onClick={() => p.onPick(m.id)}
                onMouseEnter={() => p.onPick(m.id)}
                onFocus={() => p.onPick(m.id)}
                className="pointer-events-auto flex h-11 w-11 items-end justify-center pb-1"
              >
                <span className={`rounded-md p-0.5 ring-1 ring-soil-800 ${on ? "bg-soil-800 text-white" : "bg-white text-soil-800"}`}>
                  <Mark name={kind} size={16} />
                </span>
              </button>
            </li>
          );
        })}
    </ul>
  ));
}
