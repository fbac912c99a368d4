// Readings out as SenML JSON (RFC 8428), named as our probes name them (lib/domain/metrics.ts), so
// the pack reads back through lib/domain/senml.ts and metrics.ts to the same stored values.
import { METRICS, probeBaseName, type MetricKey } from "./metrics";
import type { Metric } from "./vocabulary";

export type SenmlRecord = { bn?: string; bt?: number; n: string; u?: string; t: number; v: number };
export type ExportedReading = { probeCode: string; metric: Metric; ts: Date; value: number };

// Units from the RFC 8428 §12.1 registry (Table 6) where one carries the stored value as it is:
// Cel, V, %EL, count. Moisture is stored as percent of wet mass; SenML's "%" would not say that
// (§12.1 Note 2: a ratio), so it goes out as the registered ratio "/" (62 % → 0.62), which
// metrics.ts reads back ×100. Ammonia and signal use the secondary units ppm and dBm (RFC 8798),
// which metrics.ts accepts as they are; their RFC 8428 forms (a ratio, dBW) would only rescale them.
const OUT: Record<Metric, { unit: string; scale: number }> = {
  temperature: { unit: "Cel", scale: 1 },
  moisture: { unit: "/", scale: 1 / 100 },
  "moisture-raw": { unit: "count", scale: 1 },
  ammonia: { unit: "ppm", scale: 1 },
  "battery-voltage": { unit: "V", scale: 1 },
  "battery-level": { unit: "%EL", scale: 1 },
  signal: { unit: "dBm", scale: 1 },
};

/** The SenML unit a metric is exported in. */
export const senmlUnitOf = (m: Metric) => OUT[m].unit;

/**
 * One SenML pack: records grouped by probe, each group opening with its base name (§4.1 bn, the
 * probe's "urn:dev:wormward:<code>:"), the first record carrying the base time (§4.5.3 bt, the
 * earliest reading, seconds since the epoch); each record's `t` is relative to it (§4.6: resolved
 * time = bt + t) and `n` is the metric's name after the base name.
 */
export function readingsToSenml(rows: readonly ExportedReading[]): SenmlRecord[] {
  if (rows.length === 0) return [];
  const bt = Math.min(...rows.map((r) => r.ts.getTime())) / 1000;
  const byProbe = new Map<string, ExportedReading[]>();
  for (const r of rows) byProbe.set(r.probeCode, [...(byProbe.get(r.probeCode) ?? []), r]);
  const out: SenmlRecord[] = [];
  for (const [code, list] of byProbe) {
    list.forEach((r, i) => {
      const spec = METRICS[r.metric as MetricKey];
      out.push({
        ...(i === 0 ? { bn: probeBaseName(code) } : {}),
        ...(out.length === 0 ? { bt } : {}),
        n: spec.suffix,
        u: OUT[r.metric].unit,
        t: round(r.ts.getTime() / 1000 - bt),
        v: round(r.value * OUT[r.metric].scale),
      });
    });
  }
  return out;
}

// Millisecond times and values to 12 significant digits drop float noise (0.62 rather than 0.6200000000000001).
const round = (x: number) => Number(x.toPrecision(12));
