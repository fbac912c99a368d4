import type { Metadata } from "next";
import Link from "next/link";
import { AlertCard, type AlertState } from "@/components/alerts/alert-card";
import { AlertFilters, FILTER_FIELDS, historyHref } from "@/components/alerts/alert-filters";
import { formatMetric } from "@/components/charts/metric-words";
import { clockFormat } from "@/components/logbook/format";
import { requirePageMember } from "@/lib/web/session";
import { alertHistoryView } from "@/lib/server/alerts/list-alerts";
import { alertHistoryQuery, type AlertHistoryQuery } from "@/lib/domain/validation/alerts";
import { latestValueOf, metricOfAlert } from "@/lib/domain/alert-metric";
import { zoneInBin } from "@/lib/domain/zone-words";

export const metadata: Metadata = { title: "Alerts" };

type Search = Record<string, string | string[] | undefined>;

// The URL is the filter, so a filter is a link. A bad value is named and dropped; the good ones stay.
function readFilters(search: Search): { query: AlertHistoryQuery; problems: string[] } {
  const raw: Record<string, string> = {};
  for (const f of FILTER_FIELDS) {
    const v = search[f];
    if (typeof v === "string") raw[f] = v;
  }
  const first = alertHistoryQuery.safeParse(raw);
  if (first.success) return { query: first.data, problems: [] };
  const problems = first.error.issues.map((i) => `${String(i.path[0] ?? "filter")}: ${i.message}`);
  for (const i of first.error.issues) delete raw[String(i.path[0])];
  return { query: alertHistoryQuery.parse(raw), problems };
}

export default async function AlertsPage({ params, searchParams }: { params: Promise<{ farmId: string }>; searchParams: Promise<Search> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "read");
  const { query, problems } = readFilters(await searchParams);
  const view = await alertHistoryView(who, query);
  const clock = clockFormat(view.timezone);
  const current = { state: query.state === "all" ? undefined : query.state, bin: query.bin, kind: query.kind, level: query.level };
  const filtered = Object.values(current).some(Boolean);

  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <h1 className="text-3xl font-bold">Alerts</h1>
        <p className="text-sm text-soil-700">Every alert of the farm, newest first. Open one to see its chart and what happened.</p>
      </div>
      {problems.length > 0 && (
        <p role="alert" className="rounded-xl bg-clay-100 p-3 text-sm ring-1 ring-clay-500">
          Some filters were left out: {problems.join(" ")}
        </p>
      )}
      <AlertFilters farmId={farmId} bins={view.bins} current={current} />
      {view.alerts.length === 0 ? (
        <p className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          {filtered || query.before
            ? "No alerts match these filters. Try fewer, or show every alert."
            : "No alerts yet. When a rule raises one, it is listed here, and stays after it settles."}
          {filtered && (
            <Link href={historyHref(farmId, {})} className="mt-2 flex min-h-11 items-center underline underline-offset-4">
              Show every alert
            </Link>
          )}
        </p>
      ) : (
        <ol aria-label="Alerts, newest first" className="space-y-2">
          {view.alerts.map(({ alert: a, binName, zoneKind, zoneName, claimedByName, raisedMessage }) => {
            const state: AlertState =
              a.state === "settled"
                ? { mark: "done", words: `settled ${a.settledAt ? clock(a.settledAt.toISOString()) : ""}` }
                : a.state === "claimed"
                  ? { mark: "claimed", words: `claimed by ${claimedByName ?? "someone"}` }
                  : { mark: "raised", words: "raised, not claimed yet" };
            const v = latestValueOf(a);
            return (
              <li key={a.id} data-alert-id={a.id} data-state={a.state}>
                <AlertCard
                  level={a.level}
                  kind={a.kind}
                  where={zoneKind ? zoneInBin(binName, { kind: zoneKind, name: zoneName }) : binName}
                  message={raisedMessage ?? a.message}
                  latest={
                    a.state !== "settled" && v != null && a.kind !== "silent_probe"
                      ? `now ${formatMetric(metricOfAlert(a.kind, a.details), v, view.unitSystem)}`
                      : null
                  }
                  when={clock(a.raisedAt.toISOString())}
                  state={state}
                  settled={a.state === "settled"}
                  href={`/farms/${farmId}/alerts/${a.id}`}
                />
              </li>
            );
          })}
        </ol>
      )}
      {view.older && (
        <Link
          href={historyHref(farmId, { ...current, state: query.state === "all" ? undefined : query.state, ...view.older })}
          className="flex min-h-12 items-center justify-center rounded-xl bg-white font-bold underline underline-offset-4 ring-1 ring-soil-300"
        >
          Older alerts
        </Link>
      )}
      {query.before && (
        <Link href={historyHref(farmId, current)} className="flex min-h-11 items-center underline underline-offset-4">
          Back to the newest
        </Link>
      )}
    </main>
  );
}
