"use client";

import Link from "next/link";
import { useState } from "react";
import { useLogDone } from "@/components/logbook/log-action";
import { FieldError, INPUT, LogFormFrame, num } from "@/components/logbook/log-form-parts";
import { useBinRefresh } from "@/lib/client/revalidate";
import { SAVED_ON_PHONE, useSend } from "@/lib/client/use-send";
import type { RecordedSample, ZoneChoice } from "@/lib/client/wire";
import { formatNumber, formatTemperature, temperatureForDisplay, temperatureToCelsius, UNIT_LABELS, type UnitSystem } from "@/lib/domain/units";
import { zoneName } from "@/lib/domain/zone-words";
import { LOCAL_CODES } from "@/lib/domain/safety-words";

export type BinProbe = { id: number; code: string; label: string | null; zoneId: string | null };

/** The usual oven temperature for compost samples (TMECC 03.09, from memory), as on the probe's page. */
const OVEN_C = 70;

const fieldsIn = (system: UnitSystem) =>
  [
    ["wetMassG", "Wet mass (g)", true],
    ["dryMassG", "Dry mass (g)", true],
    ["tareG", "Container (g)", false],
    ["ovenTempC", `Oven (${UNIT_LABELS[system].temperature})`, false],
    ["rawReading", "Probe raw reading", false],
  ] as const;

/** An oven-dry sample taken beside one of the bin's probes: it joins that probe's calibration
 * (POST /api/probes/[probeId]/samples, as the probe's own page records it). */
export function SampleForm({
  farmId,
  binId,
  zones,
  probes,
  system,
}: {
  farmId: string;
  binId: string;
  zones: ZoneChoice[];
  probes: BinProbe[];
  system: UnitSystem;
}) {
  const refresh = useBinRefresh(binId);
  const done = useLogDone();
  const FIELDS = fieldsIn(system);
  const [probeId, setProbeId] = useState(probes[0] ? String(probes[0].id) : "");
  const { busy, errors, setErrors, log } = useSend();
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const where = (p: BinProbe) => {
    const z = zones.find((x) => x.id === p.zoneId);
    return `${z ? zoneName(z) : "No zone"}: ${p.label?.trim() || p.code}`;
  };

  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    const body: Record<string, number | undefined> = {};
    const errs: Record<string, string> = {};
    for (const [name, label, required] of FIELDS) {
      const raw = f.get(name);
      const v = typeof raw === "string" && raw.trim() !== "" ? num(raw) : undefined;
      if (v === undefined ? required : !Number.isFinite(v)) errs[name] = `${label.replace(/ \(.*\)$/, "")} must be a number.`;
      body[name] = name === "ovenTempC" && v !== undefined ? temperatureToCelsius(v, system) : v;
    }
    if (!probeId) errs.probeId = "Pick the probe the sample was taken beside.";
    setErrors(errs);
    setStatus(null);
    if (Object.keys(errs).length) return setStatus({ ok: false, text: "Not recorded: check the marked fields." });
    const sent = await log<RecordedSample>({ url: `/api/probes/${probeId}/samples`, body, binId, what: "Oven-dry sample" });
    if (!sent.ok) return setStatus({ ok: false, text: `Not recorded: ${sent.message}` });
    form.reset();
    const said = sent.kept ? SAVED_ON_PHONE : `Sample recorded: ${formatNumber(sent.value.sample.moistureWbPct, 1)} % moisture (wet basis).`;
    setStatus({ ok: true, text: said });
    await refresh();
    // Kept on the phone: the form stays open with its answer, since closing it would load a page with no signal.
    if (!sent.kept) done(said);
  }

  if (probes.length === 0) {
    return (
      <div className="space-y-2 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
        <h2 className="text-xl font-bold">Record an oven-dry sample</h2>
        <p>
          A sample is taken beside a probe, to calibrate its moisture readings, and this bin has no probe in its zones yet.{" "}
          <Link href={`/farms/${farmId}/probes`} className="underline underline-offset-4">
            Probes
          </Link>
        </p>
      </div>
    );
  }

  return (
    <LogFormFrame id="sample" title="Record an oven-dry sample" button="Record sample" busy={busy} busyWords="Recording…" status={status} onSubmit={submit}>
      <p className="text-sm text-soil-700">
        Take a handful of bedding beside the probe, weigh it, dry it to constant mass, weigh again. Give masses with the container and its mass as well, or net
        masses and no container.
      </p>
      <div>
        <label htmlFor="sample-probeId" className="block font-bold">
          Beside which probe
        </label>
        <select
          id="sample-probeId"
          value={probeId}
          onChange={(e) => setProbeId(e.target.value)}
          aria-invalid={!!errors.probeId}
          aria-describedby={errors.probeId ? "sample-probeId-error" : undefined}
          className={INPUT}
        >
          {probes.map((p) => (
            <option key={p.id} value={p.id}>
              {where(p)}
            </option>
          ))}
        </select>
        <FieldError id="sample-probeId-error" error={errors.probeId} />
      </div>
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
              className={`${INPUT} tabular`}
            />
            <FieldError id={`sample-${name}-error`} error={errors[name]} />
          </div>
        ))}
      </div>
      <p className="text-sm text-soil-700">
        Dry every sample of a probe at the same oven temperature ({formatTemperature(OVEN_C, system, { digits: 0 })} unless you have a reason to change it).
        Leave the raw reading empty to take the probe&apos;s own reading nearest the time of sampling (within 10 minutes).
      </p>
      <p className="text-sm font-bold">
        Use an oven that is not used for food. Wash your hands after handling bedding; let the oven and sample cool before weighing. {LOCAL_CODES}
      </p>
      {errors.form && <p className="text-sm font-bold text-clay-700">{errors.form}</p>}
    </LogFormFrame>
  );
}
