import Link from "next/link";
import { INPUT_CLASS } from "@/components/ui/form-parts";
import { KIND_WORDS, LEVEL_WORDS } from "@/lib/domain/alert-words";
import { ALERT_KINDS, ALERT_LEVELS } from "@/lib/domain/vocabulary";

export const FILTER_FIELDS = ["state", "bin", "kind", "level", "before", "beforeId"] as const;
export type FilterValues = Partial<Record<(typeof FILTER_FIELDS)[number], string | undefined>>;

/** The history's URL for these filters: a filter is a link anyone can share or bookmark. */
export function historyHref(farmId: string, q: FilterValues) {
  const params = new URLSearchParams();
  for (const f of FILTER_FIELDS) if (q[f]) params.set(f, q[f]!);
  const s = params.toString();
  return `/farms/${farmId}/alerts${s ? `?${s}` : ""}`;
}

const STATES = [
  { value: undefined, label: "All" },
  { value: "open", label: "Open" },
  { value: "raised", label: "Not claimed" },
  { value: "claimed", label: "Claimed" },
  { value: "settled", label: "Settled" },
] as const;

// A plain GET form, so the filters work before any script has loaded and each choice is a URL;
// the states are links as well, one tap each.
export function AlertFilters({ farmId, bins, current }: { farmId: string; bins: { id: string; name: string }[]; current: Omit<FilterValues, "before"> }) {
  return (
    <section aria-labelledby="filters-h" className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="filters-h" className="sr-only">
        Filters
      </h2>
      <nav aria-label="State" className="flex flex-wrap gap-1.5">
        {STATES.map((s) => {
          const on = current.state === s.value;
          return (
            <Link
              key={s.label}
              href={historyHref(farmId, { ...current, state: s.value })}
              aria-current={on ? "page" : undefined}
              className={`flex min-h-11 items-center rounded-full px-3 ring-1 ring-soil-300 ${on ? "bg-soil-800 font-bold text-white" : "bg-paper"}`}
            >
              {s.label}
            </Link>
          );
        })}
      </nav>
      <form method="get" action={`/farms/${farmId}/alerts`} className="grid grid-cols-2 gap-2">
        {current.state && <input type="hidden" name="state" value={current.state} />}
        <label className="col-span-2 block">
          <span className="mb-1 block font-bold">Bin</span>
          <select name="bin" defaultValue={current.bin ?? ""} className={INPUT_CLASS}>
            <option value="">Any bin</option>
            {bins.map((b) => (
              <option key={b.id} value={b.id}>
                {b.name}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">Kind</span>
          <select name="kind" defaultValue={current.kind ?? ""} className={INPUT_CLASS}>
            <option value="">Any kind</option>
            {ALERT_KINDS.map((k) => (
              <option key={k} value={k}>
                {KIND_WORDS[k]}
              </option>
            ))}
          </select>
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">Level</span>
          <select name="level" defaultValue={current.level ?? ""} className={INPUT_CLASS}>
            <option value="">Any level</option>
            {ALERT_LEVELS.map((l) => (
              <option key={l} value={l}>
                {LEVEL_WORDS[l]}
              </option>
            ))}
          </select>
        </label>
        <button className="col-span-2 min-h-12 rounded-xl bg-soil-800 px-4 font-bold text-white">Show these alerts</button>
      </form>
    </section>
  );
}
