import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { SWRConfig } from "swr";
import { AlertActions } from "@/components/alerts/alert-actions";
import { AlertCard, type AlertState } from "@/components/alerts/alert-card";
import { AlertChart } from "@/components/alerts/alert-chart";
import { AlertSteps } from "@/components/alerts/alert-steps";
import { formatMetric } from "@/components/charts/metric-words";
import { clockFormat } from "@/components/logbook/format";
import { oncePerRequest, requirePageMember } from "@/lib/web/session";
import { alertPageView } from "@/lib/server/alerts/alert-page-view";
import { seriesKey } from "@/lib/client/swr-keys";
import { KIND_WORDS } from "@/lib/domain/alert-words";
import { toWire } from "@/lib/domain/wire";
import { zoneInBin } from "@/lib/domain/zone-words";

type Params = { params: Promise<{ farmId: string; alertId: string }> };

// One read per request, shared by the tab's title and the page.
const pageView = oncePerRequest(alertPageView);

export async function generateMetadata({ params }: Params): Promise<Metadata> {
  const { farmId, alertId } = await params;
  const view = await pageView(await requirePageMember({ farmId }, "read"), alertId);
  return { title: view ? `${KIND_WORDS[view.alert.kind]} · ${view.binName}` : "Alert" };
}

export default async function AlertPage({ params }: Params) {
  const { farmId, alertId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  // Another farm's alert, or none: not found, the same answer either way.
  const view = await pageView(who, alertId);
  if (!view) notFound();
  const { alert: a, zone } = view;
  const clock = clockFormat(view.timezone);
  const where = zone ? zoneInBin(view.binName, zone) : view.binName;
  const open = a.state !== "settled";
  const state: AlertState = !open
    ? {
        mark: "done",
        words: `settled ${a.settledAt ? clock(a.settledAt.toISOString()) : ""}${view.settledBy ? ` by ${view.settledBy}` : ", the readings came back"}`,
      }
    : a.state === "claimed"
      ? { mark: "claimed", words: `claimed by ${view.claimedByName ?? "someone"}` }
      : { mark: "raised", words: "raised, not claimed yet" };
  const latest = open && view.latestValue != null && a.kind !== "silent_probe" ? `now ${formatMetric(view.metric, view.latestValue, view.unitSystem)}` : null;
  const fallback =
    zone && view.series
      ? { [seriesKey({ zoneId: zone.id }, { metric: view.metric, from: view.window.from, to: view.window.to ?? undefined })!]: toWire(view.series) }
      : {};

  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <Link href={`/farms/${farmId}/alerts`} className="inline-flex min-h-11 items-center gap-1 text-soil-700 underline underline-offset-4">
          <span aria-hidden="true">←</span> All alerts
        </Link>
        <h1 className="text-3xl font-bold">{KIND_WORDS[a.kind]} alert</h1>
        <p className="text-sm text-soil-700">
          {zone ? (
            <Link href={`/farms/${farmId}/zones/${zone.id}`} className="underline underline-offset-4">
              {where}
            </Link>
          ) : (
            where
          )}
        </p>
      </div>

      <AlertCard
        level={a.level}
        kind={a.kind}
        where={where}
        message={view.raisedWords}
        latest={latest}
        when={`raised ${clock(a.raisedAt.toISOString())}`}
        state={state}
        settled={!open}
      />

      {view.note && (
        <section aria-labelledby="note-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          <h2 id="note-h" className="font-bold">
            Settle note{view.settledBy ? ` from ${view.settledBy}` : ""}
          </h2>
          <p className="mt-1 whitespace-pre-line" data-settle-note>
            {view.note}
          </p>
        </section>
      )}

      {open &&
        (who.role === "viewer" ? (
          <p className="rounded-2xl bg-white p-4 text-sm ring-1 ring-soil-300">
            You can read this alert. Claiming and settling it are for the farm&apos;s keepers and owners.
          </p>
        ) : (
          <AlertActions alertId={a.id} state={a.state as "raised" | "claimed"} claimedByMe={a.claimedBy === who.userId} />
        ))}

      {zone ? (
        <SWRConfig value={{ fallback }}>
          <section aria-labelledby="chart-h" className="space-y-2">
            <h2 id="chart-h" className="text-xl font-bold">
              Around the alert
            </h2>
            <AlertChart
              zoneId={zone.id}
              binZones={view.binZones}
              species={view.species}
              metric={view.metric}
              ammonia={view.ammonia}
              system={view.unitSystem}
              timezone={view.timezone}
              from={view.window.from}
              to={view.window.to}
              raisedAt={a.raisedAt.toISOString()}
              settledAt={a.settledAt?.toISOString() ?? null}
              feedings={toWire(view.feedings).feedings}
              openAlert={open ? `this ${KIND_WORDS[a.kind].toLowerCase()} alert` : null}
            />
            {view.heading && (
              <p className="rounded-xl bg-white p-3 ring-1 ring-soil-300" data-heading={view.metric}>
                <span className="font-bold">Where it is heading: </span>
                {view.heading}
              </p>
            )}
          </section>
        </SWRConfig>
      ) : (
        <p className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">This alert is about the whole bin, so there is no one zone to chart.</p>
      )}

      <AlertSteps steps={view.steps.map((s) => ({ ...s, at: s.at.toISOString() }))} timezone={view.timezone} />
    </main>
  );
}
