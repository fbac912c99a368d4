import type { Metadata } from "next";
import { BinArchive } from "@/components/settings/bin-archive";
import { FarmForm } from "@/components/settings/farm-form";
import { requirePageMember } from "@/lib/web/session";
import { farmSettingsView } from "@/lib/server/farms/settings-view";
import { archiveBinAction, bringBackBin, saveFarm } from "./actions";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";

export const metadata: Metadata = { title: "Settings" };

export default async function SettingsPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const { farm, bins } = await farmSettingsView(await requirePageMember({ farmId }, "read"));
  const heading = (
    <div className="px-1 pt-1">
      <a href={`/farms/${farmId}`} className="inline-flex min-h-11 items-center text-sm text-soil-500">
        ← Today
      </a>
      <p className="text-sm text-soil-500">{farm.name}</p>
      <h1 className="text-3xl font-bold">Settings</h1>
    </div>
  );
  if (!bins) {
    return (
      <main className="space-y-4 p-3">
        {heading}
        <p className="rounded-xl bg-soil-100 p-4">Only an owner of {farm.name} can change its settings.</p>
      </main>
    );
  }
  // A time zone stored before the API checked them must not keep the owner from fixing it here.
  const day = (d: Date) => d.toLocaleDateString("en-GB", { timeZone: timeZoneOrUtc(farm.timezone), day: "numeric", month: "short", year: "numeric" });
  const zonesWord = (n: number) => `${n} zone${n === 1 ? "" : "s"}`;
  const live = bins.filter((b) => !b.archivedAt).map((b) => ({ id: b.id, name: b.name, detail: `${b.style} · ${zonesWord(b.zones.length)}` }));
  const archived = bins.filter((b) => b.archivedAt).map((b) => ({ id: b.id, name: b.name, detail: `${b.style} · archived ${day(b.archivedAt!)}` }));
  return (
    <main className="space-y-4 p-3 pb-10">
      {heading}
      <FarmForm
        action={saveFarm}
        farmId={farmId}
        name={farm.name}
        unitSystem={farm.unitSystem}
        timezone={farm.timezone}
        feedingIntervalDays={farm.feedingIntervalDays}
        zones={Intl.supportedValuesOf("timeZone")}
      />
      <BinArchive farmId={farmId} live={live} archived={archived} archive={archiveBinAction} bringBack={bringBackBin} />
    </main>
  );
}
