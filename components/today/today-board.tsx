"use client";

import Link from "next/link";
import { useState } from "react";
import type { Today, TodayBin, TodayZone } from "@/lib/client/wire";
import { Sparkline } from "@/components/charts/sparkline";
import { StatusMark } from "@/components/ui/status-mark";
import { Panel } from "@/components/ui/panel";
import { AlertCard } from "@/components/alerts/alert-card";
import { Mark } from "@/components/ui/marks";
import { formatMetric } from "@/components/charts/metric-words";
import { KIND_WORDS, LEVEL_WORDS } from "@/lib/domain/alert-words";
import { bandBeside, latestValueOf, metricOfAlert } from "@/lib/domain/alert-metric";
import { useToday } from "@/lib/client/hooks/use-today";
import { classifyMoisture, classifyTemperature, getSpecies } from "@/lib/domain/species";
import { failureOf, send } from "@/lib/client/fetcher";
import { useTodayRefresh } from "@/lib/client/revalidate";
import { formatPercent, formatTemperature, type UnitSystem } from "@/lib/domain/units";
import { zoneName } from "@/lib/domain/zone-words";

type Zone = TodayZone;
type Bin = TodayBin;
type OpenAlert = Today["alerts"][number];

function ago(iso: string) {
  const min = Math.round((Date.now() - Date.parse(iso)) / 60_000);
  if (min < 1) return "just now";
  if (min < 60) return `${min} min ago`;
  const h = Math.round(min / 60);
  return h < 48 ? `${h} h ago` : `${Math.round(h / 24)} days ago`;
}

type Spark = { points: Zone["spark"]["temperature"]; band: [number, number]; color: string };

/** One reading of a zone: its value, its band in words and the last 24 hours. */
function Reading({ title, value, band, spark, label }: { title: string; value: string; band: string | null; spark: Spark | null; label: string }) {
  return (
    <div>
      <div className="text-xs tracking-wide text-soil-500 uppercase">{title}</div>
      <div className="tabular text-2xl font-bold">{value}</div>
      <StatusMark band={band} />
      {/* The server ends each series at the latest value, so one point means one reading so far
          (the chart's own "no readings" words would contradict the value above it). */}
      {spark && spark.points.length === 1 ? (
        <p className="flex h-14 items-center text-sm text-soil-500">First reading in; the line starts with the next.</p>
      ) : (
        spark && <Sparkline points={spark.points} band={spark.band} color={spark.color} label={label} />
      )}
    </div>
  );
}

function ZoneRow({ zone, bin, units, farmId, alerts }: { zone: Zone; bin: Bin; units: UnitSystem; farmId: string; alerts: readonly OpenAlert[] }) {
  const species = getSpecies(bin.species);
  const t = zone.latest.temperature;
  const m = zone.latest.moisture;
  const tBand = bandBeside(species && t ? classifyTemperature(species, t.value) : null, alerts, "temperature");
  const mBand = bandBeside(species && m ? classifyMoisture(species, m.value) : null, alerts, "moisture");
  const zoneLabel = zoneName(zone);
  // The zone's last word from any of its metrics: a moisture-only probe is not "no readings yet".
  const newest = [t?.ts, m?.ts]
    .filter((x): x is string => !!x)
    .sort()
    .at(-1);
  return (
    <li className="border-t border-soil-100 py-3 first:border-t-0">
      <div className="flex items-baseline justify-between gap-2">
        <h3 className="font-bold">
          <Link href={`/farms/${farmId}/zones/${zone.id}`} className="inline-flex min-h-11 items-center underline underline-offset-4">
            {zoneLabel}
          </Link>
        </h3>
        <span className="text-xs text-soil-500">{newest ? ago(newest) : "no readings yet"}</span>
      </div>
      {/* The zone's open alerts come before its values. */}
      {[...alerts]
        .sort((x, y) => Number(y.level === "act_now") - Number(x.level === "act_now"))
        .map((a) => (
          <Link
            key={a.id}
            href={`/farms/${farmId}/alerts/${a.id}`}
            className="mt-1 flex min-h-11 items-center gap-1.5 rounded-lg bg-paper px-2 font-bold underline underline-offset-4 ring-1 ring-soil-300"
          >
            <Mark name={a.level === "act_now" ? "actNow" : "headsUp"} />
            {LEVEL_WORDS[a.level]}: {KIND_WORDS[a.kind]} alert open
          </Link>
        ))}
      <div className="mt-2 grid grid-cols-2 gap-3">
        <Reading
          title="Temperature"
          value={t ? formatTemperature(t.value, units) : "—"}
          band={tBand}
          spark={
            species && { points: zone.spark.temperature, band: [species.temperatureC.comfortLow, species.temperatureC.comfortHigh], color: "--color-clay-500" }
          }
          label={`${bin.name}, ${zoneLabel}: temperature over the last 24 hours`}
        />
        <Reading
          title="Moisture"
          value={m ? formatPercent(m.value) : "—"}
          band={mBand}
          spark={
            species && { points: zone.spark.moisture, band: [species.moisturePct.comfortLow, species.moisturePct.comfortHigh], color: "--color-slate-500" }
          }
          label={`${bin.name}, ${zoneLabel}: moisture over the last 24 hours`}
        />
      </div>
    </li>
  );
}

function latestWords(a: OpenAlert, units: UnitSystem): string | null {
  if (a.kind === "silent_probe") return null;
  const v = latestValueOf(a);
  return v == null ? null : `now ${formatMetric(metricOfAlert(a.kind, a.details), v, units)}`;
}

function ClaimButton({ alertId, farmId }: { alertId: string; farmId: string }) {
  const refreshToday = useTodayRefresh(farmId);
  const [note, setNote] = useState<string | null>(null);
  async function claim() {
    try {
      await send("POST", `/api/alerts/${alertId}/claim`);
      setNote("Claimed: you are on it.");
    } catch (err) {
      setNote(failureOf(err).message);
    }
    await refreshToday();
  }
  return (
    <div className="mt-2">
      <button onClick={claim} className="min-h-11 rounded-lg bg-soil-800 px-4 font-bold text-white">
        I&apos;m on it
      </button>
      <span aria-live="polite" className="ml-2 text-sm">
        {note}
      </span>
    </div>
  );
}

export function TodayBoard({ farmId, units, canLog }: { farmId: string; units: UnitSystem; canLog: boolean }) {
  const { data, error } = useToday(farmId);
  if (!data) return <p className="p-4 text-soil-700">{error ? error.message : "Loading…"}</p>;
  return (
    <div className="space-y-4 p-3">
      <Panel id="alerts-h" title="Open alerts" small>
        {data.alerts.length === 0 ? (
          <p className="mt-1 text-soil-700">None. Every bin is quiet.</p>
        ) : (
          <ul className="mt-2 space-y-2">
            {/* act now first, then heads-up; each level keeps the server's order */}
            {[...data.alerts]
              .sort((x, y) => Number(y.level === "act_now") - Number(x.level === "act_now"))
              .map((a) => (
                <li key={a.id} id={`alert-${a.id}`}>
                  <AlertCard
                    level={a.level}
                    kind={a.kind}
                    where={a.binName}
                    message={a.message}
                    latest={latestWords(a, units)}
                    href={`/farms/${farmId}/alerts/${a.id}`}
                    when={a.state === "claimed" ? `claimed by ${a.claimedByName ?? "someone"}` : `raised ${ago(a.raisedAt)}`}
                  >
                    {canLog && a.state === "raised" && <ClaimButton alertId={a.id} farmId={farmId} />}
                  </AlertCard>
                </li>
              ))}
          </ul>
        )}
      </Panel>
      {data.bins.length === 0 && (
        <p className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">No bins yet. An owner adds bins and their zones; probes then report here.</p>
      )}
      {data.bins.map((bin) => {
        const species = getSpecies(bin.species);
        return (
          <section key={bin.id} aria-label={bin.name} className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
            <header className="mb-1">
              <h2 className="text-xl font-bold">
                <Link href={`/farms/${farmId}/bins/${bin.id}`} className="inline-flex min-h-11 items-center underline underline-offset-4">
                  {bin.name}
                </Link>
              </h2>
              <p className="text-sm text-soil-700">
                {bin.style} · <i>{species?.name ?? bin.species}</i>
                {species
                  ? ` · comfortable ${formatTemperature(species.temperatureC.comfortLow, units, { digits: 0 })}–${formatTemperature(species.temperatureC.comfortHigh, units, { digits: 0 })}`
                  : ""}
              </p>
              <p
                data-cycle="feeding"
                className={`mt-1 flex items-start gap-1.5 text-sm ${bin.feeding.status === "overdue" || bin.feeding.status === "today" ? "font-bold text-clay-700" : "text-soil-700"}`}
              >
                <Mark name="feeding" className="mt-1 shrink-0" />
                <span>{bin.feeding.words}</span>
              </p>
            </header>
            {bin.zones.length === 0 ? (
              <p className="text-soil-700">This bin has no zones.</p>
            ) : (
              <ul>
                {bin.zones.map((z) => (
                  <ZoneRow key={z.id} zone={z} bin={bin} units={units} farmId={farmId} alerts={data.alerts.filter((a) => a.zoneId === z.id)} />
                ))}
              </ul>
            )}
          </section>
        );
      })}
    </div>
  );
}
