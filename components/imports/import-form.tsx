"use client";

import { useRouter } from "next/navigation";
import { useEffect, useId, useRef, useState } from "react";
import { Mark } from "@/components/ui/marks";
import { failureOf, send } from "@/lib/client/fetcher";
import type { ImportResult } from "@/lib/client/wire";
import { guessMapping, IMPORT_METRICS, readCsv, readHeader } from "@/lib/domain/csv-import";
import { METRICS } from "@/lib/domain/metrics";

type ProbeChoice = { code: string; label: string | null };
type Failure = { message: string; field?: string };

// What each field expects, in the keeper's words.
const HINTS = {
  file: "One reading per row: a time, a value, and the probe and what it measures as columns or chosen below.",
  unit: "Without one, values are read as °C, % wet basis, ppm, V and dBm.",
  timezone: "Times like 2025-05-01 14:30 are read in this zone; times ending in Z or +02:00 keep their own.",
};

const FIXED = "__fixed__";
const NONE = "";
const input = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg";
const rows = (n: number, what: string) => `${n} ${n === 1 ? what.replace(/s$/, "") : what}`;
const when = (iso: string) => new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" });

function Field({ id, label, hint, error, children }: { id: string; label: string; hint?: string; error?: string; children: React.ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="mb-1 block font-bold">
        {label}
      </label>
      {children}
      {hint && <p className="mt-1 text-sm text-soil-500">{hint}</p>}
      {error && (
        <p id={`${id}-error`} className="mt-1 flex items-center gap-1 font-bold text-clay-700">
          <Mark name="error" />
          {error}
        </p>
      )}
    </div>
  );
}

export function ImportForm({ farmId, probes, timezone }: { farmId: string; probes: ProbeChoice[]; timezone: string }) {
  const router = useRouter();
  const uid = useId();
  const [file, setFile] = useState<File | null>(null);
  const [header, setHeader] = useState<string[]>([]);
  const [preview, setPreview] = useState<string[][]>([]);
  const [time, setTime] = useState(NONE);
  const [value, setValue] = useState(NONE);
  const [probe, setProbe] = useState(NONE);
  const [probeCode, setProbeCode] = useState(probes[0]?.code ?? "");
  const [metric, setMetric] = useState(NONE);
  const [metricFixed, setMetricFixed] = useState<string>("temperature");
  const [unit, setUnit] = useState(NONE);
  const [tz, setTz] = useState(timezone);
  const [busy, setBusy] = useState(false);
  const [outcome, setOutcome] = useState<ImportResult | null>(null);
  const [failure, setFailure] = useState<Failure | null>(null);
  const fileInput = useRef<HTMLInputElement>(null);

  // A file picked before the page finished loading (a slow phone) has no change event left to fire.
  useEffect(() => {
    const early = fileInput.current?.files?.[0];
    if (early) void onFile(early);
  }, []);

  async function onFile(f: File | null) {
    setFile(f);
    setOutcome(null);
    setFailure(null);
    if (!f) return setHeader([]);
    // The first 64 KiB are enough for the header and a preview; the server reads the whole file.
    const head = await f.slice(0, 64 * 1024).text();
    const { header: cols } = readHeader(head);
    setHeader(cols);
    setPreview(
      readCsv(head)
        .rows.slice(0, 3)
        .map((r) => r.cells),
    );
    const g = guessMapping(cols);
    setTime(g.time ?? NONE);
    setValue(g.value ?? NONE);
    setProbe(g.probe ?? FIXED);
    setMetric(g.metric ?? FIXED);
    setUnit(g.unit ?? NONE);
    if (cols.length === 0) setFailure({ field: "file", message: "This file has no header line." });
  }

  async function onSubmit(e: React.FormEvent) {
    e.preventDefault();
    if (!file) return setFailure({ field: "file", message: "Choose a CSV file." });
    setBusy(true);
    setFailure(null);
    setOutcome(null);
    const form = new FormData();
    form.set("file", file);
    form.set("time", time);
    form.set("value", value);
    if (probe === FIXED) form.set("probeCode", probeCode);
    else form.set("probe", probe);
    if (metric === FIXED) form.set("metricFixed", metricFixed);
    else form.set("metric", metric);
    if (unit) form.set("unit", unit);
    form.set("timezone", tz);
    try {
      setOutcome(await send<ImportResult>("POST", `/api/farms/${farmId}/imports`, form));
      router.refresh();
    } catch (err) {
      setFailure(failureOf(err));
    } finally {
      setBusy(false);
    }
  }

  const errorFor = (...fields: string[]) => (failure?.field && fields.includes(failure.field) ? failure.message : undefined);
  /** An input's id and, when the server named its field, the error tied to it. */
  const tied = (id: string, ...fields: string[]) => ({
    id,
    "aria-invalid": errorFor(...fields) ? true : undefined,
    "aria-describedby": errorFor(...fields) ? `${id}-error` : undefined,
  });
  const columnSelect = (field: string, v: string, set: (s: string) => void, opts: { fixed?: string; optional?: boolean }) => (
    <select {...tied(`${uid}-${field}`, field)} value={v} onChange={(e) => set(e.target.value)} className={input}>
      {(opts.optional || v === NONE) && <option value={NONE}>{opts.optional ? "— none —" : "Choose a column"}</option>}
      {opts.fixed && <option value={FIXED}>{opts.fixed}</option>}
      {header.map((h) => (
        <option key={h} value={h}>
          {h}
        </option>
      ))}
    </select>
  );

  return (
    <form onSubmit={onSubmit} className="space-y-5 rounded-2xl bg-white p-4 shadow-sm ring-1 ring-soil-300">
      <Field id={`${uid}-file`} label="Logger file (CSV)" hint={HINTS.file} error={errorFor("file")}>
        <input
          ref={fileInput}
          {...tied(`${uid}-file`, "file")}
          type="file"
          accept=".csv,.txt,text/csv"
          onChange={(e) => void onFile(e.target.files?.[0] ?? null)}
          className="block w-full rounded-xl border border-dashed border-soil-500 bg-paper p-4 text-lg file:mr-3 file:h-12 file:rounded-lg file:border-0 file:bg-soil-800 file:px-4 file:font-bold file:text-soil-100"
        />
      </Field>

      {header.length > 0 && (
        <>
          {preview.length > 0 && (
            <div className="overflow-x-auto">
              <table className="tabular min-w-full text-left text-sm">
                <caption className="mb-1 text-left text-sm text-soil-500">First rows of {file?.name}</caption>
                <thead>
                  <tr>
                    {header.map((h) => (
                      <th key={h} className="border-b border-soil-300 px-2 py-1">
                        {h}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {preview.map((row, i) => (
                    <tr key={i}>
                      {header.map((h, j) => (
                        <td key={h} className="px-2 py-1">
                          {row[j] ?? ""}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
          <fieldset className="space-y-4">
            <legend className="mb-2 text-xl font-bold">Which column is which?</legend>
            <Field id={`${uid}-time`} label="Time" error={errorFor("time")}>
              {columnSelect("time", time, setTime, {})}
            </Field>
            <Field id={`${uid}-value`} label="Value" error={errorFor("value")}>
              {columnSelect("value", value, setValue, {})}
            </Field>
            <Field id={`${uid}-probe`} label="Probe" error={probe === FIXED ? undefined : errorFor("probe", "probeCode")}>
              {columnSelect("probe", probe, setProbe, { fixed: "One probe for the whole file" })}
            </Field>
            {probe === FIXED && (
              <Field id={`${uid}-probe-code`} label="Which probe?" error={errorFor("probeCode")}>
                <select id={`${uid}-probe-code`} value={probeCode} onChange={(e) => setProbeCode(e.target.value)} className={input}>
                  {probes.map((p) => (
                    <option key={p.code} value={p.code}>
                      {p.label ? `${p.label} (${p.code})` : p.code}
                    </option>
                  ))}
                </select>
              </Field>
            )}
            <Field id={`${uid}-metric`} label="Measures" error={errorFor("metric", "metricFixed")}>
              {columnSelect("metric", metric, setMetric, { fixed: "The same for the whole file" })}
            </Field>
            {metric === FIXED && (
              <Field id={`${uid}-metric-fixed`} label="Measures, for the whole file">
                <select id={`${uid}-metric-fixed`} value={metricFixed} onChange={(e) => setMetricFixed(e.target.value)} className={input}>
                  {IMPORT_METRICS.map((m) => (
                    <option key={m} value={m}>
                      {METRICS[m].label}
                      {METRICS[m].displayUnit ? ` (${METRICS[m].displayUnit})` : ""}
                      {m === "battery-voltage" || m === "battery-level" ? ` — ${m === "battery-voltage" ? "volts" : "percent"}` : ""}
                    </option>
                  ))}
                </select>
              </Field>
            )}
            <Field id={`${uid}-unit`} label="Unit column (if any)" hint={HINTS.unit} error={errorFor("unit")}>
              {columnSelect("unit", unit, setUnit, { optional: true })}
            </Field>
            <Field id={`${uid}-tz`} label="Time zone of times without one" hint={HINTS.timezone} error={errorFor("timezone")}>
              <input
                {...tied(`${uid}-tz`, "timezone")}
                value={tz}
                onChange={(e) => setTz(e.target.value)}
                className={input}
                autoComplete="off"
                spellCheck={false}
              />
            </Field>
          </fieldset>
        </>
      )}

      <div aria-live="polite" className="space-y-2">
        {failure && !failure.field && <p className="flex items-center gap-1 rounded-xl bg-clay-100 p-3 font-bold text-clay-700">
            <Mark name="error" />
            {failure.message}
          </p>}
        {failure?.field && <p className="flex items-center gap-1 font-bold text-clay-700">
            <Mark name="error" />
            Fix the field marked above.
          </p>}
        {outcome && <Result outcome={outcome} />}
      </div>

      <button
        type="submit"
        disabled={busy || !file || header.length === 0}
        className="h-14 w-full rounded-xl bg-leaf-700 text-lg font-bold text-white disabled:opacity-60"
      >
        {busy ? "Importing…" : "Import readings"}
      </button>
    </form>
  );
}

function Result({ outcome }: { outcome: ImportResult }) {
  const i = outcome.import;
  if (outcome.duplicate) {
    return (
      <p className="rounded-xl bg-straw-100 p-3 text-straw-800">
        <strong>Already imported.</strong> This file was imported on {when(i.createdAt)} with the same columns; nothing was added.
      </p>
    );
  }
  return (
    <div className="rounded-xl bg-leaf-100 p-3 text-leaf-700">
      <p className="tabular">
        <strong className="inline-flex items-center gap-1">
          <Mark name="done" />
          {rows(i.rowsStored, "readings")} stored
        </strong>
        {outcome.alreadyStored > 0 && <> · {outcome.alreadyStored} already there</>}
        {i.rowsRejected > 0 && (
          <>
            {" "}
            · <span className="inline-flex items-center gap-1 text-clay-700">
              <Mark name="error" />
              {rows(i.rowsRejected, "rows")} refused
            </span>
          </>
        )}
      </p>
      {outcome.earlier.length > 0 && (
        <p className="mt-1 text-sm">
          This file was imported before ({when(outcome.earlier[0]!.createdAt)}) with other columns; readings already stored were skipped.
        </p>
      )}
      {i.report.length > 0 && <BadRows report={i.report} truncated={outcome.reportTruncated} total={i.rowsRejected} />}
    </div>
  );
}

export function BadRows({ report, truncated, total }: { report: { line: number; reason: string }[]; truncated: boolean; total: number }) {
  return (
    <details className="mt-2 text-soil-900" open={report.length <= 10}>
      <summary className="min-h-11 cursor-pointer py-2 font-bold">Refused rows, by line</summary>
      <ol className="tabular space-y-1 text-sm">
        {report.map((b) => (
          <li key={`${b.line}-${b.reason}`}>
            <strong>Line {b.line}:</strong> {b.reason}
          </li>
        ))}
      </ol>
      {truncated && <p className="mt-1 text-sm">…and {total - report.length} more not listed.</p>}
    </details>
  );
}
