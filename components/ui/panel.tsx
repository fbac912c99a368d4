import type { ReactNode } from "react";

/** A white card with its heading, the section named by it (aria-labelledby) for screen readers. */
export function Panel({ id, title, small, children }: { id: string; title: ReactNode; small?: boolean; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id={id} className={`${small ? "text-lg" : "text-xl"} font-bold`}>
        {title}
      </h2>
      {children}
    </section>
  );
}
