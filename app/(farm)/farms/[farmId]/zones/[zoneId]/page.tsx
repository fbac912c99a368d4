import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { SWRConfig } from "swr";
import { formatMetric, metricStatus, METRIC_TITLES } from "@/components/charts/metric-words";
import { BinChart } from "@/components/charts/bin-chart";
import { ZoneCharts } from "@/components/charts/zone-charts";
import { clockFormat, zoneWords } from "@/components/logbook/format";
import { StatusMark } from "@/components/ui/status-mark";
import { AlertCard, type AlertState } from "@/components/alerts/alert-card";
import { KIND_WORDS } from "@/lib/domain/alert-words";
import { oncePerRequest, requirePageMember } from "@/lib/web/session";
import { zonePageView } from "@/lib/server/zones/zone-page-view";
import { feedingsKey, zoneSeriesKey } from "@/lib/client/swr-keys";
import { toWire } from "@/lib/domain/wire";

export async function generateMetadata({ params }: { params: Promise<{ farmId: string; zoneId: string }> }): Promise<Metadata> {
  const { farmId, zoneId } = await params;
  const view = await pageView(await requirePageMember({ farmId, zoneId }, "read"), zoneId);
  return { title: view ? `${zoneWords(view.zone)} · ${view.bin.name}` : "Zone" };
}

// One read per request, shared by the tab's title and the page.
const pageView = oncePerRequest(zonePageView);

type ZoneAlert = NonNullable<Awaited<ReturnType<typeof zonePageView>>>["alerts"][number];

type OpenAlert = NonNullable<Awaited<ReturnType<typeof zonePageView>>>["openAlerts"][number];

// An open alert's kind says how a value inside the band should read: never "comfortable" beside it.
const ALERT_BAND: Record<OpenAlert["kind"], string> = {
  heat: "warm",
  chill: "cool",
  drying: "dry",
  soggy: "wet",
  ammonia: "ammonia",
  silent_probe: "no reading",
  probe_fault: "no reading",
};

const withArticle = (w: string) => `${/^[aeiou]/.test(w) ? "an" : "a"} ${w}`;

function openState(a: OpenAlert): AlertState {
  return a.state === "claimed"
    ? { mark: "claimed", words: `claimed by ${a.claimedByName ?? "someone"}` }
    : { mark: "raised", words: "raised, not claimed yet" };
}

function AlertRow({ a, clock, farmId }: { a: ZoneAlert; clock: (t: string | number) => string; farmId: string }) {
  const state: AlertState =
    a.state === "settled"
      ? { mark: "done", words: `settled ${a.settledAt ? clock(a.settledAt.toISOString()) : ""}` }
      : a.state === "claimed"
        ? { mark: "claimed", words: `claimed by ${a.claimedByName ?? "someone"}` }
        : { mark: "raised", words: "raised, not claimed yet" };
  return (
    <li>
      <AlertCard
        level={a.level}
        kind={a.kind}
        message={a.message}
        when={clock(a.raisedAt.toISOString())}
        state={state}
        settled={a.state === "settled"}
        href={`/farms/${farmId}/alerts/${a.id}`}
      />
    </li>
  );
}

export default async function ZonePage({ params }: { params: Promise<{ farmId: string; zoneId: string }> }) {
  const { farmId, zoneId } = await params;
  const who = await requirePageMember({ farmId, zoneId }, "read");
  const view = await pageView(who, zoneId);
  if (!view) notFound();
  const { zone, bin, unitSystem: system, timezone, profile, ammonia, metrics, binZones, alerts, openAlerts, heading } = view;
  const earlier = alerts.filter((a) => a.state === "settled");
  // Prime SWR with the server's answers so the phone paints the charts at once.
  const fallback: Record<string, unknown> = { [feedingsKey(bin.id)!]: toWire(view.feedings) };
  for (const { metric, answer } of view.series) fallback[zoneSeriesKey(zoneId, metric)] = toWire(answer);
  const clock = clockFormat(timezone);
  const canLog = who.role !== "viewer";
  const title = zoneWords(zone);

  return (
    <main className="space-y-4 p-3 pb-10">
      <div className="px-1 pt-1">
        <Link href={`/farms/${farmId}/bins/${bin.id}`} className="inline-flex min-h-11 items-center gap-1 text-soil-700 underline underline-offset-4">
          <span aria-hidden="true">←</span> {bin.name}
        </Link>
        <h1 className="text-3xl font-bold">{title}</h1>
        <p className="text-sm text-soil-700">
          {bin.name} · {bin.style} · <i>{profile?.name ?? bin.species}</i>
          {profile ? ` (${profile.commonName})` : ""} · {view.probeCount === 1 ? "1 probe" : `${view.probeCount} probes`}
        </p>
      </div>

      {/* An open alert comes first, above the values: the bed's trouble before its numbers. */}
      {openAlerts.length > 0 && (
        <section aria-labelledby="open-h" data-open-alerts className="space-y-2">
          <h2 id="open-h" className="text-xl font-bold">
            {openAlerts.length === 1 ? "Open alert here" : `${openAlerts.length} open alerts here`}
          </h2>
          <ul className="space-y-2">
            {openAlerts.map((a) => (
              <li key={a.id}>
                <AlertCard
                  level={a.level}
                  kind={a.kind}
                  message={a.raisedWords}
                  latest={a.latestValue != null ? `now ${formatMetric(a.metric, a.latestValue, system)}` : null}
                  when={`raised ${clock(a.raisedAt.toISOString())}`}
                  state={openState(a)}
                  href={`/farms/${farmId}/alerts/${a.id}`}
                >
                  <Link
                    href={`/farms/${farmId}/alerts/${a.id}`}
                    className="mt-2 inline-flex min-h-11 items-center rounded-lg bg-soil-800 px-4 font-bold text-white"
                  >
                    {canLog ? "Open the alert to claim or settle it" : "Open the alert"}
                  </Link>
                </AlertCard>
              </li>
            ))}
          </ul>
        </section>
      )}

      <section aria-labelledby="now-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 id="now-h" className="sr-only">
          Latest readings
        </h2>
        <dl className="grid grid-cols-2 gap-x-3 gap-y-4">
          {metrics.map((m) => {
            const l = view.latest[m];
            const plain = l && profile ? metricStatus(m, l.value, profile, ammonia) : { band: null, label: "no reading" };
            const alertOn = openAlerts.find((a) => a.metric === m && !a.kind.endsWith("probe") && a.kind !== "probe_fault");
            const status =
              alertOn && plain.band === "comfortable"
                ? { band: ALERT_BAND[alertOn.kind], label: `in the band, but ${withArticle(KIND_WORDS[alertOn.kind].toLowerCase())} alert is open` }
                : plain;
            const where = m === "temperature" || m === "moisture" ? heading[m] : null;
            return (
              <div key={m} className={m === "ammonia" ? "col-span-2" : ""}>
                <dt className="text-xs tracking-wide text-soil-500 uppercase">{METRIC_TITLES[m]}</dt>
                <dd>
                  <span className="tabular block text-3xl font-bold">{l ? formatMetric(m, l.value, system) : "—"}</span>
                  <StatusMark band={status.band} label={status.label} />
                  <span className="tabular mt-1 block text-xs text-soil-500">{l ? `at ${clock(l.ts)}` : "no readings yet"}</span>
                  {where && l && (
                    <span className="mt-1 block text-sm text-soil-800" data-heading={m}>
                      {where.words}
                    </span>
                  )}
                </dd>
              </div>
            );
          })}
        </dl>
        {canLog && (
          <Link
            href={`/farms/${farmId}/bins/${bin.id}?zone=${zone.id}#log`}
            className="mt-4 flex min-h-12 items-center justify-center rounded-xl bg-leaf-700 px-4 font-bold text-white"
          >
            Log a feeding here
          </Link>
        )}
      </section>

      <SWRConfig value={{ fallback }}>
        <ZoneCharts
          zoneId={zone.id}
          binId={bin.id}
          binZones={binZones}
          species={bin.species}
          metrics={metrics}
          ammonia={ammonia}
          system={system}
          timezone={timezone}
          latest={view.latest}
          heading={heading}
          openAlerts={Object.fromEntries(
            [...openAlerts]
              .reverse()
              .filter((a) => ALERT_BAND[a.kind] !== "no reading")
              .map((a) => [a.metric, withArticle(`${KIND_WORDS[a.kind].toLowerCase()} alert`)]),
          )}
        />
      </SWRConfig>
      <p className="px-1 text-sm">
        <Link
          href={`/farms/${farmId}/logbook?place=zone:${zone.id}#readings-export`}
          className="inline-flex min-h-11 items-center underline underline-offset-4"
        >
          Download this zone&apos;s readings (CSV or SenML)
        </Link>
      </p>

      {/* The zone beside its neighbours: every zone of the bin on one chart. */}
      {binZones.length > 1 && (
        <section aria-labelledby="bin-zones-h" className="space-y-2">
          <h2 id="bin-zones-h" className="text-xl font-bold">
            All zones of this bin
          </h2>
          <BinChart farmId={farmId} binId={bin.id} zones={binZones} system={system} timezone={timezone} />
        </section>
      )}

      <section aria-labelledby="alerts-h" className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 id="alerts-h" className="text-xl font-bold">
          Earlier alerts in this zone
        </h2>
        <p className="text-sm text-soil-700">
          Settled in the last 30 days.{" "}
          <Link href={`/farms/${farmId}/alerts?bin=${bin.id}`} className="underline underline-offset-4">
            Every alert of {bin.name}
          </Link>
        </p>
        {earlier.length === 0 ? (
          <p className="mt-2">None settled here in the last 30 days.</p>
        ) : (
          <ul className="mt-2 space-y-2">
            {earlier.map((a) => (
              <AlertRow key={a.id} a={a} clock={clock} farmId={farmId} />
            ))}
          </ul>
        )}
      </section>
    </main>
  );
}
