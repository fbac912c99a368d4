import { MARKS, type MarkName } from "./mark-shapes";

export { MARKS, type MarkName } from "./mark-shapes";

/**
 * One mark from the registry (components/ui/mark-shapes.ts), in the colour of the text around it.
 * Always beside its word: the mark is hidden from screen readers, the word is what they read.
 */
export function Mark({ name, size = 12, className }: { name: MarkName; size?: number; className?: string }) {
  const m = MARKS[name];
  const stroke = "stroke" in m ? m.stroke : undefined;
  return (
    <svg viewBox="0 0 12 12" width={size} height={size} aria-hidden="true" data-mark={name} className={`shrink-0 ${className ?? ""}`}>
      {stroke ? (
        <path d={m.d} fill="none" stroke="currentColor" strokeWidth={stroke} strokeLinecap="round" strokeLinejoin="round" />
      ) : (
        <path d={m.d} fill="currentColor" fillRule="evenodd" />
      )}
    </svg>
  );
}

/** A word with its mark in a rounded chip; `strong` draws it heavier (a "too …" band). */
export function MarkChip({ name, cls, strong, children }: { name: MarkName; cls: string; strong?: boolean; children: React.ReactNode }) {
  return (
    <span className={`inline-flex items-center gap-1 rounded-full px-2 py-0.5 text-sm ring-1 ${cls} ${strong ? "font-bold ring-2" : ""}`}>
      <Mark name={name} />
      {children}
    </span>
  );
}
