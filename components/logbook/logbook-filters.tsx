import Link from "next/link";
import { INPUT_CLASS } from "@/components/ui/form-parts";
import { LOG_KIND_LOOK } from "@/components/logbook/kind-look";
import { zoneWords } from "@/components/logbook/format";
import { Mark } from "@/components/ui/marks";
import { LOG_KINDS } from "@/lib/domain/vocabulary";

export const LOGBOOK_FILTER_FIELDS = ["kind", "bin", "zone", "who", "from", "to"] as const;
export type LogbookFilterValues = Partial<Record<(typeof LOGBOOK_FILTER_FIELDS)[number] | "before", string | undefined>>;

/** The filters as a query string (no "?"), in one order, so a page and its SWR key agree. */
export function logbookSearch(q: LogbookFilterValues): string {
  const params = new URLSearchParams();
  for (const f of [...LOGBOOK_FILTER_FIELDS, "before"] as const) if (q[f]) params.set(f, q[f]!);
  return params.toString();
}

/** The farm logbook's URL for these filters: a filter is a link anyone can share or bookmark. */
export function logbookHref(farmId: string, q: LogbookFilterValues) {
  const s = logbookSearch(q);
  return `/farms/${farmId}/logbook${s ? `?${s}` : ""}`;
}

/** The CSV of the logbook with these filters (no paging: the whole match). */
export function logbookCsvHref(farmId: string, q: LogbookFilterValues) {
  const s = logbookSearch({ ...q, before: undefined });
  return `/api/farms/${farmId}/logbook/export?format=csv${s ? `&${s}` : ""}`;
}

type Choice = { id: string; name: string };

// A plain GET form, so the filters work before any script has loaded and each choice is a URL; the
// kinds are links as well, one tap each.
export function LogbookFilters({
  farmId,
  bins,
  zones,
  people,
  current,
}: {
  farmId: string;
  bins: Choice[];
  zones: { id: string; binId: string; kind: string; name: string | null }[];
  people: Choice[];
  current: Omit<LogbookFilterValues, "before">;
}) {
  const binName = new Map(bins.map((b) => [b.id, b.name]));
  // Zones of the chosen bin, or of every bin (named with their bin) when none is chosen.
  const zoneChoices = zones.filter((z) => !current.bin || z.binId === current.bin);
  return (
    <section aria-labelledby="filters-h" className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="filters-h" className="sr-only">
        Filters
      </h2>
      <nav aria-label="Kind" className="flex flex-wrap gap-1.5">
        {[undefined, ...LOG_KINDS].map((k) => {
          const on = current.kind === k;
          return (
            <Link
              key={k ?? "all"}
              href={logbookHref(farmId, { ...current, kind: k })}
              aria-current={on ? "page" : undefined}
              className={`flex min-h-11 items-center gap-1 rounded-full px-3 ring-1 ring-soil-300 ${on ? "bg-soil-800 font-bold text-white" : "bg-paper"}`}
            >
              {k && <Mark name={LOG_KIND_LOOK[k].mark} />}
              {k ? LOG_KIND_LOOK[k].plural : "Every kind"}
            </Link>
          );
        })}
      </nav>
      {/* On a phone the list matters more than the form: it stays folded unless one of its filters is on. */}
      <details open={Boolean(current.bin || current.zone || current.who || current.from || current.to)} className="group">
        <summary className="flex min-h-11 cursor-pointer items-center font-bold underline underline-offset-4">Bin, zone, who and dates</summary>
        <form method="get" action={`/farms/${farmId}/logbook`} className="mt-2 grid grid-cols-2 gap-2">
          {current.kind && <input type="hidden" name="kind" value={current.kind} />}
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
            <span className="mb-1 block font-bold">Zone</span>
            <select name="zone" defaultValue={current.zone ?? ""} className={INPUT_CLASS}>
              <option value="">Any zone</option>
              {zoneChoices.map((z) => (
                <option key={z.id} value={z.id}>
                  {current.bin ? zoneWords(z) : `${binName.get(z.binId) ?? "Bin"}: ${zoneWords(z)}`}
                </option>
              ))}
            </select>
          </label>
          <label className="block">
            <span className="mb-1 block font-bold">Who</span>
            <select name="who" defaultValue={current.who ?? ""} className={INPUT_CLASS}>
              <option value="">Anyone</option>
              {people.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </select>
          </label>
          <label className="block">
            <span className="mb-1 block font-bold">From</span>
            <input type="date" name="from" defaultValue={current.from ?? ""} className={`${INPUT_CLASS} tabular`} />
          </label>
          <label className="block">
            <span className="mb-1 block font-bold">To</span>
            <input type="date" name="to" defaultValue={current.to ?? ""} className={`${INPUT_CLASS} tabular`} />
          </label>
          <button className="col-span-2 min-h-12 rounded-xl bg-soil-800 px-4 font-bold text-white">Show these entries</button>
        </form>
      </details>
    </section>
  );
}
