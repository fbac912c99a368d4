"use client";

import { useMemo, useState } from "react";
import { zoneWords } from "@/components/logbook/format";
import { INPUT_CLASS } from "@/components/ui/form-parts";
import { localClock } from "@/lib/domain/clock";
import { READINGS_EXPORT_CAP } from "@/lib/domain/export-limits";

type Bin = { id: string; name: string; zones: { id: string; kind: string; name: string | null }[] };

const METRIC_CHOICES = [
  { key: "temperature", label: "Temperature" },
  { key: "moisture", label: "Moisture" },
  { key: "ammonia", label: "Ammonia" },
  { key: "moisture-raw", label: "Moisture (raw count)" },
  { key: "battery-voltage", label: "Battery (V)" },
  { key: "battery-level", label: "Battery (%)" },
  { key: "signal", label: "Signal" },
] as const;

const dayBefore = (day: string, n: number) => new Date(Date.UTC(+day.slice(0, 4), +day.slice(5, 7) - 1, +day.slice(8, 10) - n)).toISOString().slice(0, 10);

// Readings of one zone or one bin over farm-local days, as a file: CSV in the farm's units and time
// zone, or SenML JSON for other software. The link changes as the choices do; nothing is sent until
// it is followed.
export function ReadingsExportForm({ farmId, bins, timezone, initialPlace }: { farmId: string; bins: Bin[]; timezone: string; initialPlace?: string }) {
  const today = useMemo(() => localClock(new Date(), timezone).date, [timezone]);
  const [place, setPlace] = useState(initialPlace ?? (bins[0] ? `bin:${bins[0].id}` : ""));
  const [from, setFrom] = useState(() => dayBefore(today, 6));
  const [to, setTo] = useState(today);
  const [format, setFormat] = useState<"csv" | "senml">("csv");
  const [metrics, setMetrics] = useState<string[]>(["temperature", "moisture", "ammonia"]);
  const [kind, id] = place.split(":");
  const q = new URLSearchParams({ format, [kind === "zone" ? "zoneId" : "binId"]: id ?? "", from, to });
  if (metrics.length) q.set("metric", metrics.join(","));
  const href = `/api/farms/${farmId}/readings/export?${q}`;
  const problem = !place
    ? "Add a bin first."
    : from > to
      ? "The end date is before the start date."
      : metrics.length === 0
        ? "Tick at least one metric."
        : null;

  return (
    <section id="readings-export" aria-labelledby="readings-export-h" className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 id="readings-export-h" className="text-xl font-bold">
        Download readings
      </h2>
      <label className="block">
        <span className="mb-1 block font-bold">Where</span>
        <select value={place} onChange={(e) => setPlace(e.target.value)} className={INPUT_CLASS}>
          {bins.map((b) => (
            <optgroup key={b.id} label={b.name}>
              <option value={`bin:${b.id}`}>{b.name}: every zone</option>
              {b.zones.map((z) => (
                <option key={z.id} value={`zone:${z.id}`}>
                  {b.name}: {zoneWords(z)}
                </option>
              ))}
            </optgroup>
          ))}
        </select>
      </label>
      <div className="grid grid-cols-2 gap-2">
        <label className="block">
          <span className="mb-1 block font-bold">From</span>
          <input type="date" value={from} onChange={(e) => setFrom(e.target.value)} className={`${INPUT_CLASS} tabular`} />
        </label>
        <label className="block">
          <span className="mb-1 block font-bold">To</span>
          <input type="date" value={to} onChange={(e) => setTo(e.target.value)} className={`${INPUT_CLASS} tabular`} />
        </label>
      </div>
      <fieldset>
        <legend className="font-bold">Metrics</legend>
        <div className="grid grid-cols-2 gap-x-2">
          {METRIC_CHOICES.map((m) => (
            <label key={m.key} className="flex min-h-11 items-center gap-2">
              <input
                type="checkbox"
                className="size-5 accent-leaf-700"
                checked={metrics.includes(m.key)}
                onChange={(e) => setMetrics((ms) => (e.target.checked ? [...ms, m.key] : ms.filter((x) => x !== m.key)))}
              />
              {m.label}
            </label>
          ))}
        </div>
      </fieldset>
      <fieldset>
        <legend className="font-bold">Format</legend>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="readings-format" className="size-5 accent-leaf-700" checked={format === "csv"} onChange={() => setFormat("csv")} />
          CSV, for a spreadsheet (farm units and time zone)
        </label>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="readings-format" className="size-5 accent-leaf-700" checked={format === "senml"} onChange={() => setFormat("senml")} />
          SenML JSON, for other software (SI units, Unix times)
        </label>
      </fieldset>
      {problem ? (
        <p className="font-bold text-clay-700">{problem}</p>
      ) : (
        <a href={href} download className="flex min-h-12 items-center justify-center rounded-xl bg-soil-800 px-4 font-bold text-white">
          Download readings
        </a>
      )}
      <p className="text-sm text-soil-700">
        Days run midnight to midnight in the farm&apos;s time zone ({timezone}). A file holds up to {READINGS_EXPORT_CAP.toLocaleString("en-GB")} readings; for
        more, choose fewer days or metrics.
      </p>
    </section>
  );
}
