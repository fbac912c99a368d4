"use client";

import { useState } from "react";
import { Panel } from "@/components/ui/panel";
import { failureOf, send } from "@/lib/client/fetcher";
import { useCalibration } from "@/lib/client/hooks/use-calibration";
import { useSend } from "@/lib/client/use-send";
import type { FittedCalibration, RecordedSample } from "@/lib/client/wire";
import {
  celsiusDeltaToFahrenheit,
  formatNumber,
  formatTemperature,
  temperatureForDisplay,
  temperatureToCelsius,
  UNIT_LABELS,
  type UnitSystem,
} from "@/lib/domain/units";
import { calibrationMatch } from "@/lib/domain/calibration";
import { LOCAL_CODES } from "@/lib/domain/safety-words";

const num = (s: FormDataEntryValue | null) => (typeof s !== "string" || s.trim() === "" ? undefined : Number(s.trim().replace(",", ".")));
const fieldsIn = (system: UnitSystem) =>
  [
    ["wetMassG", "Wet mass (g)", true],
    ["dryMassG", "Dry mass (g)", true],
    ["tareG", "Container (g)", false],
    ["ovenTempC", `Oven (${UNIT_LABELS[system].temperature})`, false],
    ["rawReading", "Probe raw reading", false],
  ] as const;
/** The usual oven temperature for compost samples (TMECC 03.09, from memory). */
const OVEN_C = 70;
// Masses stay in grams on every farm (a kitchen or lab balance); the oven is in the farm's units.
const ovenWords = (c: number, system: UnitSystem) => formatTemperature(c, system, { digits: 0 });
const spreadWords = (dc: number, system: UnitSystem) =>
  `${Math.round(system === "metric" ? dc : celsiusDeltaToFahrenheit(dc))} ${UNIT_LABELS[system].temperature}`;

// Oven-dry samples beside one probe, and the straight line from its raw count to moisture (wet basis).
export function ProbeCalibration({
  probeId,
  placed,
  canLog,
  canFit,
  system,
}: {
  probeId: number;
  placed: boolean;
  canLog: boolean;
  canFit: boolean;
  system: UnitSystem;
}) {
  const FIELDS = fieldsIn(system);
  const { data, error, mutate } = useCalibration(probeId);
  const { busy, errors, setErrors, run } = useSend();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const [fitStatus, setFitStatus] = useState<{ ok: boolean; text: string } | null>(null);

  async function record(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    const body: Record<string, number | undefined> = {};
    const errs: Record<string, string> = {};
    for (const [name, label, required] of FIELDS) {
      const v = num(f.get(name));
      if (v === undefined ? required : !Number.isFinite(v)) errs[name] = `${label.replace(/ \(.*\)$/, "")} must be a number.`;
      body[name] = name === "ovenTempC" && v !== undefined ? temperatureToCelsius(v, system) : v;
    }
    setErrors(errs);
    if (Object.keys(errs).length) return setStatus({ ok: false, text: "Not recorded: check the marked fields." });
    const sent = await run(() => send<RecordedSample>("POST", `/api/probes/${probeId}/samples`, body));
    if (!sent.ok) return setStatus({ ok: false, text: `Not recorded: ${sent.message}` });
    const out = sent.value;
    form.reset();
    const raw =
      out.rawFrom === "probe"
        ? ` The probe read ${formatNumber(out.sample.rawReading!, 0)} then.`
        : out.rawFrom === "none"
          ? " No probe reading within 10 minutes: this sample cannot join a fit."
          : "";
    setStatus({ ok: true, text: `Recorded: ${formatNumber(out.sample.moistureWbPct, 1)} % moisture (wet basis).${raw}` });
    await mutate();
  }

  async function fit() {
    try {
      const out = await send<FittedCalibration>("POST", `/api/probes/${probeId}/calibration`);
      setFitStatus({ ok: true, text: `Fitted from ${out.calibration.points} samples.` });
    } catch (err) {
      setFitStatus({ ok: false, text: `Not fitted: ${failureOf(err).message}` });
    }
    await mutate();
  }

  async function clear() {
    if (!confirm("Forget this calibration? New raw readings will not be turned into moisture until you fit again.")) return;
    try {
      await send("DELETE", `/api/probes/${probeId}/calibration`);
      setFitStatus({ ok: true, text: "Calibration cleared." });
    } catch (err) {
      setFitStatus({ ok: false, text: `Not cleared: ${failureOf(err).message}` });
    }
    await mutate();
  }

  const input = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg tabular";
  const cal = data?.calibration;
  // Plain words first; slope, intercept, R² and residuals under "The numbers".
  const match = cal && data ? calibrationMatch({ n: cal.points, residuals: data.residuals.map((r) => r.residual) }) : null;
  return (
    <div className="space-y-4">
      <Panel id="cal-h" title="Calibration">
        {!data ? (
          <p className="text-soil-700">{error ? error.message : "Loading…"}</p>
        ) : cal ? (
          <>
            <p className="mt-1 font-bold" id="cal-match">
              {match!.headline}
            </p>
            <p className="text-sm">{match!.detail}</p>
            <p className="text-sm text-soil-700">
              From {cal.points} samples, fitted {new Date(cal.fittedAt).toLocaleString("en-GB")}. The line holds only between the lowest and highest raw
              readings sampled.
            </p>
            <details className="mt-2">
              <summary className="min-h-11 cursor-pointer py-2 font-bold">The numbers</summary>
              <p className="tabular mt-1" id="cal-line">
                moisture % = {formatNumber(cal.slope, 4)} × raw + {formatNumber(cal.intercept, 2)}
              </p>
              <dl className="tabular mt-2 grid grid-cols-3 gap-2">
                <div>
                  <dt className="text-xs text-soil-700 uppercase">Slope</dt>
                  <dd className="font-bold">{formatNumber(cal.slope, 4)}</dd>
                </div>
                <div>
                  <dt className="text-xs text-soil-700 uppercase">Intercept</dt>
                  <dd className="font-bold">{formatNumber(cal.intercept, 2)}</dd>
                </div>
                <div>
                  <dt className="text-xs text-soil-700 uppercase">R²</dt>
                  <dd className="font-bold">{formatNumber(cal.r2, 3)}</dd>
                </div>
              </dl>
              {data.residuals.length > 0 && (
                <table className="tabular mt-2 w-full text-sm">
                  <caption className="text-left font-bold">Residuals (sample − line)</caption>
                  <thead>
                    <tr>
                      <th className="text-left">Raw</th>
                      <th className="text-right">Sample %</th>
                      <th className="text-right">Residual</th>
                    </tr>
                  </thead>
                  <tbody>
                    {data.residuals.map((r) => (
                      <tr key={r.sampleId}>
                        <td>{formatNumber(r.raw, 0)}</td>
                        <td className="text-right">{formatNumber(r.moisturePct, 1)}</td>
                        <td className="text-right">{formatNumber(r.residual, 2)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              )}
            </details>
          </>
        ) : (
          <p className="mt-1">Not calibrated: its moisture readings are kept as raw counts until a line is fitted from oven-dry samples.</p>
        )}
        {canFit && data && (
          <div className="mt-3 flex flex-wrap gap-2">
            <button type="button" onClick={fit} className="min-h-12 rounded-xl bg-leaf-700 px-4 font-bold text-white">
              Fit calibration
            </button>
            {cal && (
              <button type="button" onClick={clear} className="min-h-12 rounded-xl px-4 ring-1 ring-soil-500">
                Clear
              </button>
            )}
          </div>
        )}
        <p role="status" aria-live="polite" className={`min-h-6 text-sm font-bold ${fitStatus?.ok ? "text-leaf-700" : "text-clay-700"}`}>
          {fitStatus?.text}
        </p>
      </Panel>

      {canLog && (
        <form onSubmit={record} noValidate className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          <h2 className="text-xl font-bold">Record an oven-dry sample</h2>
          {!placed && <p className="font-bold text-clay-700">Place this probe in a zone first: a sample belongs to the bed around it.</p>}
          <p className="text-sm text-soil-700">
            Take a handful of bedding beside the probe, weigh it, dry it to constant mass, weigh again. Give masses with the container and its mass as well, or
            net masses and no container.
          </p>
          <div className="grid grid-cols-2 gap-3">
            {FIELDS.map(([name, label]) => (
              <div key={name}>
                <label htmlFor={`sample-${name}`} className="block font-bold">
                  {label}
                </label>
                <input
                  id={`sample-${name}`}
                  name={name}
                  inputMode="decimal"
                  defaultValue={name === "ovenTempC" ? String(Math.round(temperatureForDisplay(OVEN_C, system))) : ""}
                  aria-invalid={!!errors[name]}
                  aria-describedby={errors[name] ? `sample-${name}-error` : undefined}
                  className={input}
                />
                {errors[name] && (
                  <p id={`sample-${name}-error`} className="mt-1 text-sm font-bold text-clay-700">
                    {errors[name]}
                  </p>
                )}
              </div>
            ))}
          </div>
          <p className="text-sm text-soil-700">
            Dry every sample of a probe at the same oven temperature ({ovenWords(OVEN_C, system)} unless you have a reason to change it). Leave the raw reading
            empty to take the probe&apos;s own reading nearest the time of sampling (within 10 minutes).
          </p>
          <p className="text-sm font-bold">
            Use an oven that is not used for food. Wash your hands after handling bedding; let the oven and sample cool before weighing. {LOCAL_CODES}
          </p>
          <details className="text-sm text-soil-700">
            <summary className="min-h-11 cursor-pointer py-2 font-bold">Where this comes from</summary>
            <p>
              ASTM D2216 dries soil at {ovenWords(110, system)} ± {spreadWords(5, system)}, but notes that organic material can decompose there; compost methods
              use lower temperatures such as {ovenWords(OVEN_C, system)} (TMECC 03.09, the US Composting Council&apos;s test methods).
            </p>
          </details>
          <button disabled={busy || !placed} className="min-h-12 w-full rounded-xl bg-leaf-700 px-4 text-lg font-bold text-white disabled:opacity-60">
            {busy ? "Recording…" : "Record sample"}
          </button>
          <p role="status" aria-live="polite" className={`min-h-6 text-sm font-bold ${status?.ok ? "text-leaf-700" : "text-clay-700"}`}>
            {status?.text}
            {errors.form && !status ? errors.form : ""}
          </p>
        </form>
      )}

      <Panel id="samples-h" title="Samples">
        {data && data.samples.length === 0 && <p className="text-soil-700">No samples yet.</p>}
        {data && data.samples.length > 0 && (
          <ol aria-label="Samples, newest first" className="divide-y divide-soil-100">
            {data.samples.map((s) => (
              <li key={s.id} className="tabular py-2 text-sm">
                <b>{formatNumber(s.moistureWbPct, 1)} %</b> wet basis · raw {s.rawReading == null ? "—" : formatNumber(s.rawReading, 0)} · wet{" "}
                {formatNumber(s.wetMassG, 1)} g, dry {formatNumber(s.dryMassG, 1)} g{s.tareG ? `, container ${formatNumber(s.tareG, 1)} g` : ""}
                {s.ovenTempC != null ? ` · oven ${ovenWords(s.ovenTempC, system)}` : ""}
                <span className="block text-soil-700">
                  {new Date(s.at).toLocaleString("en-GB")} · by {s.byName ?? "someone no longer on the farm"}
                </span>
              </li>
            ))}
          </ol>
        )}
      </Panel>
    </div>
  );
}
