import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { RulesTable } from "@/components/rules/rules-table";
import { KIND_WORDS } from "@/lib/domain/alert-words";
import { requirePageMember } from "@/lib/web/session";
import { binWithFarm } from "@/lib/server/bins/bin-with-farm";
import { binRulesView } from "@/lib/server/rules/bin-rules-view";
import { getSpecies } from "@/lib/domain/species";
import { toWire } from "@/lib/domain/wire";
import { BAND_SOURCES } from "@/lib/domain/rules/summary";

export const metadata: Metadata = { title: "Alert rules" };

export default async function BinRulesPage({ params }: { params: Promise<{ farmId: string; binId: string }> }) {
  const { farmId, binId } = await params;
  const who = await requirePageMember({ farmId, binId }, "read");
  const place = await binWithFarm(who, binId);
  const species = place && getSpecies(place.bin.species);
  if (!place || !species) notFound();
  const { bin, farm } = place;
  // The same answer GET /api/bins/[binId]/rules gives, so the client's SWR cache starts full.
  const initial = toWire(await binRulesView(who, binId));
  const owner = who.role === "owner";

  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <Link href={`/farms/${farmId}/bins/${binId}`} className="inline-flex min-h-11 items-center gap-1 text-soil-700 underline underline-offset-4">
          <span aria-hidden="true">←</span> {bin.name}
        </Link>
        <h1 className="text-3xl font-bold">Alert rules</h1>
        <p className="text-sm text-soil-700">
          {bin.name} · <i>{species.name}</i> ({species.commonName}). Defaults come from the species; a blank box keeps the default. Change a number to see what
          it would have raised over the last 30 days before you save.
        </p>
        {!owner && <p className="mt-2 rounded-xl bg-soil-100 p-3">Only an owner of {farm.name} can change these rules.</p>}
      </div>
      <RulesTable binId={binId} initial={initial} words={KIND_WORDS} system={farm.unitSystem} timezone={farm.timezone} canEdit={owner} />
      <section className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <details>
          <summary className="min-h-11 cursor-pointer py-2 font-bold">Where the {species.commonName}&apos;s lines come from</summary>
          {/* Quoted as the sources print them, in °C; the rules above are in the farm's units (data-both-units
              tells the words test this block is a quotation). */}
          <div data-both-units className="space-y-2 text-sm text-soil-700">
            {farm.unitSystem === "imperial" && <p>The studies give their figures in °C (°F = °C × 1.8 + 32).</p>}
            <ul className="list-disc space-y-2 pl-5">
              {BAND_SOURCES[species.id].map((line) => (
                <li key={line}>{line}</li>
              ))}
            </ul>
          </div>
        </details>
      </section>
    </main>
  );
}
