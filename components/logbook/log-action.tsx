"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { createContext, useCallback, useContext, useState, type ReactNode } from "react";
import { Mark } from "@/components/ui/marks";
import type { MarkName } from "@/components/ui/mark-shapes";

export type LogChoice = { key: string; label: string; hint: string; mark: MarkName; href: string };

const LogDone = createContext<(said: string) => void>(() => {});
/** What a log form calls once its entry is stored: the chooser closes the form and says what was logged. */
export const useLogDone = () => useContext(LogDone);

// One "Log" button for every kind of logbook entry: it opens a list of kinds, and the chosen one's
// form shows below. The kind lives in the address (?log=water), so a reload keeps it and Back closes
// it; the page renders the chosen form on the server and hands it in as children.
export function LogAction({ choices, open, closeHref, children }: { choices: LogChoice[]; open: LogChoice | null; closeHref: string; children: ReactNode }) {
  const router = useRouter();
  const [said, setSaid] = useState<string | null>(null);
  const done = useCallback(
    (words: string) => {
      setSaid(words);
      router.replace(closeHref, { scroll: false });
    },
    [router, closeHref],
  );
  return (
    <section aria-labelledby="log-h" className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="log-h" className="sr-only">
        Log work
      </h2>
      {open ? (
        <div className="flex items-center justify-between gap-2">
          <p className="flex items-center gap-2 text-lg font-bold">
            <Mark name={open.mark} /> Logging: {open.label.toLowerCase()}
          </p>
          <Link href={closeHref} scroll={false} replace className="inline-flex min-h-11 items-center px-2 text-soil-700 underline underline-offset-4">
            Close
          </Link>
        </div>
      ) : (
        <details className="group">
          <summary className="flex min-h-12 cursor-pointer list-none items-center justify-center rounded-xl bg-leaf-700 px-4 text-lg font-bold text-white">
            Log
            <span aria-hidden="true" className="ml-2 group-open:rotate-180">
              ▾
            </span>
          </summary>
          <ul aria-label="What to log" className="mt-2 divide-y divide-soil-100">
            {choices.map((c) => (
              <li key={c.key}>
                <Link href={c.href} scroll={false} className="flex min-h-12 items-center gap-3 py-2">
                  <Mark name={c.mark} />
                  <span>
                    <span className="block text-lg font-bold underline underline-offset-4">{c.label}</span>
                    <span className="block text-sm text-soil-700">{c.hint}</span>
                  </span>
                </Link>
              </li>
            ))}
          </ul>
        </details>
      )}
      <LogDone.Provider value={done}>{open && children}</LogDone.Provider>
      <p role="status" aria-live="polite" className="text-sm font-bold text-leaf-700 empty:hidden">
        {!open && said && (
          <span className="inline-flex items-center gap-1">
            <Mark name="done" />
            {said}
          </span>
        )}
      </p>
    </section>
  );
}
