import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { SWRConfig } from "swr";
import { BinCycleForm } from "@/components/bins/bin-cycle-form";
import { BinCyclePanel } from "@/components/bins/bin-cycle-panel";
import { BinSizeForm } from "@/components/bins/bin-size-form";
import { YieldsChart } from "@/components/bins/yields-chart";
import { BinChart } from "@/components/charts/bin-chart";
import { zoneWords } from "@/components/logbook/format";
import { LogAction } from "@/components/logbook/log-action";
import { logKindsFor, type LogFormProps } from "@/components/logbook/log-kinds";
import { LogbookList } from "@/components/logbook/logbook-list";
import { StatusMark } from "@/components/ui/status-mark";
import { AlertCard } from "@/components/alerts/alert-card";
import { formatMetric } from "@/components/charts/metric-words";
import { bandBeside, latestValueOf, metricOfAlert } from "@/lib/domain/alert-metric";
import { zonedFormat } from "@/lib/domain/clock";
import { oncePerRequest, requirePageMember } from "@/lib/web/session";
import { binPageView } from "@/lib/server/bins/bin-page-view";
import { classifyMoisture, classifyTemperature, getSpecies } from "@/lib/domain/species";
import { ingredientsKey, logbookKey } from "@/lib/client/swr-keys";
import { formatPercent, formatTemperature } from "@/lib/domain/units";
import { toWire } from "@/lib/domain/wire";
import { floorAreaM2 } from "@/lib/domain/feeding-load";
import { saveBinCycle } from "./actions";

export async function generateMetadata({ params }: { params: Promise<{ farmId: string; binId: string }> }): Promise<Metadata> {
  const { farmId, binId } = await params;
  const view = await pageView(await requirePageMember({ farmId, binId }, "read"), binId);
  return { title: view?.bin.name ?? "Bin" };
}

// One read per request, shared by the tab's title and the page.
const pageView = oncePerRequest(binPageView);

export default async function BinPage({
  params,
  searchParams,
}: {
  params: Promise<{ farmId: string; binId: string }>;
  searchParams: Promise<{ zone?: string | string[]; log?: string | string[] }>;
}) {
  const { farmId, binId } = await params;
  const who = await requirePageMember({ farmId, binId }, "read");
  const view = await pageView(who, binId);
  if (!view) notFound();
  const { bin, farm, latest, canLog, openAlerts, cycle } = view;
  const clock = zonedFormat(farm.timezone, { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" });
  const profile = getSpecies(bin.species);
  const zones = bin.zones.map((z) => ({ id: z.id, kind: z.kind, name: z.name }));
  const query = await searchParams;
  const one = (v: string | string[] | undefined) => (typeof v === "string" ? v : undefined);
  const asked = one(query.zone);
  const defaultZoneId = asked && zones.some((z) => z.id === asked) ? asked : null;
  // Prime SWR with the server's answers so the logbook and the library paint at once.
  const fallback: Record<string, unknown> = { [logbookKey(binId)!]: toWire(view.logbook) };
  if (view.library) fallback[ingredientsKey(farmId)!] = toWire(view.library);
  // The "Log" button's kinds; the chosen one (?log=…) is rendered here and shown below the button.
  const here = `/farms/${farmId}/bins/${binId}`;
  const formProps: LogFormProps = {
    farmId,
    binId,
    zones,
    system: farm.unitSystem,
    probes: view.probes,
    defaultZoneId,
    harvestSide: !!cycle.harvestSide,
    feedingBin: { areaM2: floorAreaM2(bin.lengthCm, bin.widthCm), intervalDays: cycle.interval.days },
  };
  const log = logKindsFor(formProps, { log: one(query.log), zone: asked });
  const withLog = (key: string) => `${here}?${new URLSearchParams({ log: key, ...(defaultZoneId ? { zone: defaultZoneId } : {}) })}`;
  const choices = log.offered.map((k) => ({ key: k.key, label: k.label, hint: k.hint, mark: k.mark, href: withLog(k.key) }));

  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <Link href={`/farms/${farmId}`} className="inline-flex min-h-11 items-center gap-1 text-soil-700 underline underline-offset-4">
          <span aria-hidden="true">←</span> Today
        </Link>
        <h1 className="text-3xl font-bold">{bin.name}</h1>
        <p className="text-sm text-soil-700">
          {bin.style} · <i>{profile?.name ?? bin.species}</i>
          {profile ? ` (${profile.commonName})` : ""}
        </p>
        <Link href={`/farms/${farmId}/bins/${binId}/rules`} className="mt-1 inline-flex min-h-11 items-center gap-1 text-soil-700 underline underline-offset-4">
          Alert rules <span aria-hidden="true">›</span>
        </Link>
      </div>

      {openAlerts.length > 0 && (
        <section aria-labelledby="open-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          <h2 id="open-h" className="text-xl font-bold">
            Open alerts
          </h2>
          <ul className="mt-2 space-y-2">
            {openAlerts.map((a) => {
              const v = a.kind === "silent_probe" ? null : latestValueOf(a);
              return (
                <li key={a.id}>
                  <AlertCard
                    level={a.level}
                    kind={a.kind}
                    message={a.raisedWords}
                    latest={v == null ? null : `now ${formatMetric(metricOfAlert(a.kind, a.details), v, farm.unitSystem)}`}
                    href={`/farms/${farmId}/alerts/${a.id}`}
                    when={a.state === "claimed" ? `claimed by ${a.claimedByName ?? "someone"}` : `raised ${clock(a.raisedAt.toISOString())}`}
                  />
                </li>
              );
            })}
          </ul>
        </section>
      )}

      <BinCyclePanel
        feeding={cycle.feeding}
        interval={cycle.interval}
        harvestSide={cycle.harvestSide}
        planned={cycle.planned}
        form={
          canLog && (
            <BinCycleForm
              action={saveBinCycle}
              binId={binId}
              intervalDays={bin.feedingIntervalDays}
              farmIntervalDays={farm.feedingIntervalDays}
              plannedHarvestOn={bin.plannedHarvestOn}
            />
          )
        }
      />

      <section aria-labelledby="zones-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 id="zones-h" className="text-xl font-bold">
          Zones
        </h2>
        <p className="text-sm text-soil-700">From the feeding side to the harvest side.</p>
        {zones.length === 0 ? (
          <p className="mt-2">This bin has no zones.</p>
        ) : (
          <ul className="mt-2 divide-y divide-soil-100">
            {zones.map((z) => {
              const l = latest.get(z.id) ?? {};
              const t = l.temperature;
              const m = l.moisture;
              const onZone = openAlerts.filter((a) => a.zoneId === z.id);
              return (
                <li key={z.id}>
                  <Link href={`/farms/${farmId}/zones/${z.id}`} className="flex min-h-16 items-center justify-between gap-2 py-2">
                    <span className="grow">
                      <span className="block text-lg font-bold underline underline-offset-4">{zoneWords(z)}</span>
                      <span className="mt-1 grid grid-cols-2 gap-x-3">
                        <span>
                          <span className="tabular block text-lg">{t ? formatTemperature(t.value, farm.unitSystem) : "—"}</span>
                          <StatusMark band={bandBeside(profile && t ? classifyTemperature(profile, t.value) : null, onZone, "temperature")} />
                        </span>
                        <span>
                          <span className="tabular block text-lg">{m ? formatPercent(m.value) : "—"}</span>
                          <StatusMark band={bandBeside(profile && m ? classifyMoisture(profile, m.value) : null, onZone, "moisture")} />
                        </span>
                      </span>
                    </span>
                    <span aria-hidden="true" className="text-2xl text-soil-500">
                      ›
                    </span>
                  </Link>
                </li>
              );
            })}
          </ul>
        )}
      </section>

      {zones.length > 1 && (
        <section aria-labelledby="bin-chart-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          <h2 id="bin-chart-h" className="text-xl font-bold">
            All zones on one chart
          </h2>
          <BinChart farmId={farmId} binId={binId} zones={zones} system={farm.unitSystem} timezone={farm.timezone} />
        </section>
      )}

      <SWRConfig value={{ fallback }}>
        {canLog && (
          <LogAction choices={choices} open={choices.find((c) => c.key === log.open?.key) ?? null} closeHref={here}>
            {log.open?.render(formProps)}
          </LogAction>
        )}
        <section aria-labelledby="logbook-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          <h2 id="logbook-h" className="text-xl font-bold">
            Logbook
          </h2>
          <p className="mb-2 text-sm text-soil-700">
            Feedings with their mix check, water, shifts, harvests, notes and oven-dry samples, newest first. Undo is open for 24 hours to whoever logged it.
          </p>
          <LogbookList binId={binId} zones={zones} system={farm.unitSystem} timezone={farm.timezone} userId={who.userId} isOwner={who.role === "owner"} />
        </section>
      </SWRConfig>

      <section aria-labelledby="yields-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 id="yields-h" className="text-xl font-bold">
          Castings harvested
        </h2>
        <YieldsChart perHarvest={cycle.yields.perHarvest} perMonth={cycle.yields.perMonth} system={farm.unitSystem} today={cycle.today} />
      </section>

      {who.role === "owner" && (
        <BinSizeForm binId={binId} system={farm.unitSystem} size={{ lengthCm: bin.lengthCm, widthCm: bin.widthCm, depthCm: bin.depthCm }} />
      )}
    </main>
  );
}
