"use client";

import { useProbeHealth } from "@/lib/client/hooks/use-probe-health";
import type { ProbeHealth } from "@/lib/client/wire";
import { METRICS } from "@/lib/domain/metrics";
import { agoWords, clockWords, presenceWords } from "@/lib/domain/probe-presence";
import { formatNumber, formatTemperature, type UnitSystem } from "@/lib/domain/units";
import { Mark, type MarkName } from "@/components/ui/marks";

const SOURCE_WORDS: Record<ProbeHealth["refusals"][number]["source"], string> = { mqtt: "over MQTT", http: "over HTTP", csv: "in a CSV file" };

function valueWords(metric: string, value: number, system: UnitSystem): string {
  if (metric === "temperature") return formatTemperature(value, system);
  const spec = (METRICS as Record<string, { displayUnit: string } | undefined>)[metric];
  return `${formatNumber(value)}${spec?.displayUnit ? ` ${spec.displayUnit}` : ""}`;
}

const labelOf = (metric: string) => (METRICS as Record<string, { label: string } | undefined>)[metric]?.label ?? metric;

/**
 * A probe's health, kept fresh without a reload: waiting for its first reading (and, when messages
 * arrive but are refused, the latest refusal in plain words), then whether it is reporting, its
 * latest values and its recent refused messages.
 */
export function ProbeHealthPanel({ probeId, system }: { probeId: number; system: UnitSystem }) {
  const { data, error } = useProbeHealth(probeId);
  if (!data) return <p className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">{error ? error.message : "Loading…"}</p>;
  const words = presenceWords(data.presence, data.at, data.timeZone);
  const state = data.presence.state;
  const latestRefusal = data.refusals[0];
  const waiting = state === "no-reading-yet";
  const look: { mark: MarkName; cls: string } =
    state === "reporting"
      ? { mark: "reporting", cls: "bg-leaf-100 text-leaf-700 ring-leaf-500" }
      : state === "silent"
        ? { mark: "silent", cls: "bg-straw-100 text-straw-800 ring-straw-600" }
        : { mark: "waiting", cls: "bg-soil-100 text-soil-700 ring-soil-300" };
  return (
    <section aria-labelledby="probe-health" className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="probe-health" className="text-lg font-bold">
        Health
      </h2>
      <div aria-live="polite" data-probe-state={state} className="space-y-1">
        <p className={`inline-flex items-center gap-2 rounded-full px-3 py-1 font-bold ring-1 ${look.cls}`}>
          <Mark name={look.mark} size={16} />
          {waiting ? "Waiting for the first reading" : words.headline}
        </p>
        <p className="tabular text-sm">
          {waiting
            ? `This page turns live by itself when the first reading arrives; no need to reload. The probe signs in with user name ${data.probe.code} and its token; a lost token is replaced with New token on the Probes page.`
            : words.detail}
        </p>
        <p className="text-sm text-soil-700">
          Reports every {data.probe.reportIntervalS} s; silent after {data.presence.silentAfterMinutes} min without a report, over MQTT or HTTP alike
          {data.probe.connected ? " · MQTT connection open now" : ""}.
        </p>
        {waiting && latestRefusal && (
          <p data-latest-refusal className="flex gap-2 rounded-xl bg-clay-100 p-3 text-clay-700 ring-1 ring-clay-500">
            <Mark name="error" size={16} />
            <span>
              Messages arrive but are refused. Latest, {agoWords(latestRefusal.receivedAt, data.at, data.timeZone)}: {latestRefusal.sentence}
            </span>
          </p>
        )}
      </div>
      {data.latest.length > 0 && (
        <dl className="grid grid-cols-2 gap-2">
          {data.latest.map((r) => (
            <div key={r.metric} className="rounded-xl bg-paper p-2 ring-1 ring-soil-300">
              <dt className="text-sm text-soil-700">{labelOf(r.metric)}</dt>
              <dd className="tabular text-lg font-bold">{valueWords(r.metric, r.value, system)}</dd>
              <dd className="tabular text-xs text-soil-700">{agoWords(r.ts, data.at, data.timeZone)}</dd>
            </div>
          ))}
        </dl>
      )}
      <h3 className="font-bold">Refused messages</h3>
      {data.refusals.length === 0 ? (
        <p className="text-sm text-soil-700">None: nothing sent by this probe has been refused.</p>
      ) : (
        <ul className="space-y-2">
          {data.refusals.map((r) => (
            <li key={r.id} data-refusal className="rounded-xl bg-paper p-3 text-sm ring-1 ring-soil-300">
              <p className="flex gap-2 font-bold">
                <Mark name="error" size={14} />
                <span>{r.sentence}</span>
              </p>
              <p className="tabular text-soil-700">
                {clockWords(r.receivedAt, data.at, data.timeZone)} {SOURCE_WORDS[r.source]}
                {r.topic ? ` to ${r.topic}` : ""} · {r.records} record{r.records === 1 ? "" : "s"} refused
              </p>
              <ul className="text-xs break-words text-soil-700">
                {r.details.map((d, i) => (
                  <li key={i}>{d}</li>
                ))}
              </ul>
              {r.excerpt !== null && (
                <>
                  <p className="mt-1 text-xs text-soil-700">First bytes received:</p>
                  <code className="block rounded bg-white p-1 text-xs break-all">{r.excerpt}</code>
                </>
              )}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
