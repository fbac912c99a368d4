import Link from "next/link";
import type { ReactNode } from "react";
import { Mark, type MarkName } from "@/components/ui/marks";
import { cautionFor, KIND_WORDS, LEVEL_WORDS } from "@/lib/domain/alert-words";
import type { AlertKind, AlertLevel } from "@/lib/domain/vocabulary";

// One alert, the same card wherever an alert is shown (Today, a zone's list). The level is told by
// its word and its shape first: act now is a heavy card with a thick clay bar down its left edge and
// a worm curled tight; heads-up a lighter straw card with a thin bar and a ring filling from below.
// A settled alert keeps its level's word and mark on a plain card. Heat and ammonia alerts carry
// their caution (lib/domain/alert-words.ts) under the message, with the open-window mark.

const LOOK: Record<AlertLevel, { mark: MarkName; card: string; badge: string }> = {
  act_now: {
    mark: "actNow",
    card: "border-l-[10px] border-clay-700 bg-clay-100 ring-2 ring-clay-700",
    badge: "bg-clay-700 text-white uppercase tracking-wide",
  },
  heads_up: {
    mark: "headsUp",
    card: "border-l-4 border-straw-600 bg-straw-100 ring-1 ring-straw-600",
    badge: "bg-white text-straw-800 ring-1 ring-straw-600",
  },
};

export type AlertState = { mark: "raised" | "claimed" | "done"; words: string };

export function AlertCard({
  level,
  kind,
  where,
  message,
  when,
  state,
  settled,
  href,
  latest,
  children,
}: {
  level: AlertLevel;
  kind: AlertKind;
  /** The bin, when the page does not already say it. */
  where?: string | null;
  message: string;
  /** Right of the heading: when it was raised, or who claimed it. */
  when: string;
  /** A line with the alert's state under the message. */
  state?: AlertState;
  settled?: boolean;
  /** The alert's own page: the heading opens it. */
  href?: string;
  /** The latest value in words, beside the words the alert was raised with ("now 31.8 °C"). */
  latest?: string | null;
  /** The claim button, for those who may claim. */
  children?: ReactNode;
}) {
  const look = LOOK[level];
  const caution = cautionFor(kind);
  return (
    <div data-level={level} className={`rounded-xl p-3 ${settled ? "bg-paper ring-1 ring-soil-300" : look.card}`}>
      <div className="flex flex-wrap items-center justify-between gap-x-2 gap-y-1">
        <span className={`inline-flex items-center gap-1.5 rounded-md px-2 py-0.5 text-sm font-bold ${settled ? "bg-soil-100 text-soil-800" : look.badge}`}>
          <Mark name={look.mark} size={16} />
          {LEVEL_WORDS[level]}
        </span>
        <span className="tabular text-sm">{when}</span>
      </div>
      <h3 className="mt-1.5 text-lg leading-snug font-bold">
        {href ? (
          <Link href={href} className="inline-flex min-h-11 items-center underline underline-offset-4">
            {KIND_WORDS[kind] ?? kind}
            {where ? ` · ${where}` : ""}
          </Link>
        ) : (
          <>
            {KIND_WORDS[kind] ?? kind}
            {where ? ` · ${where}` : ""}
          </>
        )}
      </h3>
      <p className="mt-0.5">
        {message}
        {latest ? <span className="tabular font-bold"> · {latest}</span> : null}
      </p>
      {caution && (
        <p className="mt-1 flex items-start gap-1.5 text-sm text-soil-800">
          <Mark name="caution" className="mt-0.5" />
          {caution}
        </p>
      )}
      {state && (
        <p className="mt-1 flex items-center gap-1.5 text-sm">
          <Mark name={state.mark} />
          {state.words}
        </p>
      )}
      {children}
    </div>
  );
}
