import type { Metadata } from "next";
import Link from "next/link";
import { SWRConfig } from "swr";
import { LogbookFilters, LOGBOOK_FILTER_FIELDS, logbookCsvHref, logbookHref, logbookSearch } from "@/components/logbook/logbook-filters";
import { LogbookList } from "@/components/logbook/logbook-list";
import { ReadingsExportForm } from "@/components/logbook/readings-export-form";
import { requirePageMember } from "@/lib/web/session";
import { farmLogbookView, LOGBOOK_PAGE } from "@/lib/server/logbook/farm-logbook";
import { farmLogbookQuery, type FarmLogbookQuery } from "@/lib/domain/validation/logbook-filters";
import { LOGBOOK_EXPORT_CAP } from "@/lib/domain/export-limits";
import { farmLogbookKey } from "@/lib/client/swr-keys";
import { toWire } from "@/lib/domain/wire";

export const metadata: Metadata = { title: "Logbook" };

type Search = Record<string, string | string[] | undefined>;

// The URL is the filter, so a filter is a link. A bad value is named and dropped; the good ones stay.
function readFilters(search: Search): { query: FarmLogbookQuery; raw: Record<string, string>; problems: string[] } {
  const raw: Record<string, string> = {};
  for (const f of [...LOGBOOK_FILTER_FIELDS, "before"] as const) {
    const v = search[f];
    if (typeof v === "string" && v !== "") raw[f] = v;
  }
  const first = farmLogbookQuery.safeParse(raw);
  if (first.success) return { query: first.data, raw, problems: [] };
  const problems = first.error.issues.map((i) => `${String(i.path[0] ?? "filter")}: ${i.message}`);
  for (const i of first.error.issues) delete raw[String(i.path[0])];
  return { query: farmLogbookQuery.parse(raw), raw, problems };
}

export default async function LogbookPage({ params, searchParams }: { params: Promise<{ farmId: string }>; searchParams: Promise<Search> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  const { query, raw, problems } = readFilters(await searchParams);
  const view = await farmLogbookView(who, query);
  const current = { kind: raw.kind, bin: raw.bin, zone: raw.zone, who: raw.who, from: raw.from, to: raw.to };
  const filtered = Object.values(current).some(Boolean);
  // The list reads the same page through SWR (so an undo refreshes it); the server's answer primes it.
  const search = [logbookSearch({ ...current, before: raw.before }), `limit=${LOGBOOK_PAGE}`].filter(Boolean).join("&");
  const fallback = { [farmLogbookKey(farmId, search)!]: toWire({ entries: view.entries, older: view.older }) };
  const liveBins = view.bins.filter((b) => !b.archived);
  // A zone page links here with ?place=zone:<id> to start the readings form on that zone.
  const asked = (await searchParams).place;
  const place = liveBins.flatMap((b) => [`bin:${b.id}`, ...b.zones.map((z) => `zone:${z.id}`)]).find((p) => p === asked);

  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <h1 className="text-3xl font-bold">Logbook</h1>
        <p className="text-sm text-soil-700">
          Everything logged on the farm, newest first: feedings with their mix check, water, shifts, harvests, notes and oven-dry samples.
        </p>
      </div>
      {problems.length > 0 && (
        <p role="alert" className="rounded-xl bg-clay-100 p-3 text-sm ring-1 ring-clay-500">
          Some filters were left out: {problems.join(" ")}
        </p>
      )}
      <LogbookFilters farmId={farmId} bins={view.bins} zones={view.zones} people={view.people} current={current} />
      <div className="flex flex-wrap items-center gap-2">
        <a
          href={logbookCsvHref(farmId, current)}
          download
          className="flex min-h-12 items-center justify-center rounded-xl bg-white px-4 font-bold underline-offset-4 ring-1 ring-soil-300"
        >
          Download CSV
        </a>
        <p className="text-sm text-soil-700">
          {filtered ? "These filters, " : "Every entry, "}times in {view.timezone}, amounts in {view.unitSystem === "imperial" ? "US units" : "metric units"};
          up to {LOGBOOK_EXPORT_CAP.toLocaleString("en-GB")} entries a file.
        </p>
      </div>
      <section aria-labelledby="entries-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 id="entries-h" className="sr-only">
          Entries
        </h2>
        <SWRConfig value={{ fallback }}>
          <LogbookList
            farmId={farmId}
            search={search}
            showBin
            zones={view.zones}
            system={view.unitSystem}
            timezone={view.timezone}
            userId={who.userId}
            isOwner={who.role === "owner"}
            emptyWords={
              filtered || query.before
                ? "No entries match these filters. Try fewer, or show every entry."
                : "Nothing logged yet. Log a feeding, water, a shift, a harvest or a note from a bin's page, and it shows up here."
            }
          />
        </SWRConfig>
        {filtered && (
          <Link href={logbookHref(farmId, {})} className="flex min-h-11 items-center underline underline-offset-4">
            Show every entry
          </Link>
        )}
      </section>
      {view.older && (
        <Link
          href={logbookHref(farmId, { ...current, before: view.older })}
          className="flex min-h-12 items-center justify-center rounded-xl bg-white font-bold underline underline-offset-4 ring-1 ring-soil-300"
        >
          Older entries
        </Link>
      )}
      {query.before && (
        <Link href={logbookHref(farmId, current)} className="flex min-h-11 items-center underline underline-offset-4">
          Back to the newest
        </Link>
      )}
      {liveBins.length > 0 && <ReadingsExportForm farmId={farmId} bins={liveBins} timezone={view.timezone} initialPlace={place} />}
    </main>
  );
}
