// What probes report, and how SenML records map to stored readings.
//
// Naming: a probe publishes with base name "urn:dev:wormward:<probeId>:" and these names, so a
// resolved record is named e.g. "urn:dev:wormward:p-7f3a:temp" (RFC 8428 §4.5.1 charset; the
// probe id itself may not hold ":" or "/").
//   temp          temperature, Cel
//   moisture      moisture content, percent of wet mass, after calibration on the probe
//   moisture-raw  the uncalibrated sensor count, no unit; the ingest applies the probe's calibration
//   nh3           ammonia, ppm
//   battery       battery voltage (V) or remaining charge (%EL), told apart by the unit
//   rssi          received signal strength, dBm
//   fw            firmware version, as a string value (vs)
//
// A record without a unit takes the metric's stored unit: RFC 8428 §4.5.2 leaves units to the
// application context when neither u nor bu is given. "battery" must say which it is.
//
// Units: "Cel", "K", "/", "%EL", "V", "dBW", "count" are SenML units (RFC 8428 Table 6). "ppm",
// "mV" and "dBm" are secondary units (RFC 8798; read in its working-group draft), which packs MAY
// use. "/100" (percent) is a secondary unit seen only in an implementation's list of RFC 8798 units.
// "%" is refused for moisture: RFC 8428 §12.1 Note 2 makes it a ratio (0–1), not a percentage.
import type { ResolvedRecord } from "./senml";

export const PROBE_URN_PREFIX = "urn:dev:wormward:";
const PROBE_ID = /^[A-Za-z0-9][A-Za-z0-9._-]*$/;

export const METRIC_KEYS = ["temperature", "moisture", "moisture-raw", "ammonia", "battery-voltage", "battery-level", "signal", "firmware"] as const;
export type MetricKey = (typeof METRIC_KEYS)[number];

/** Stored value = sent value × scale + offset. A unit of null means "no unit given". */
export type UnitRule = { unit: string | null; scale: number; offset: number };

export type MetricSpec = {
  key: MetricKey;
  /** SenML name after the probe's base name. */
  suffix: string;
  label: string;
  kind: "number" | "string";
  /** SenML unit of the stored value (null: dimensionless or text). */
  unit: string | null;
  /** What a screen prints after the number. */
  displayUnit: string;
  accepts: readonly UnitRule[];
  /** Values outside are refused as faults; null for text. */
  range: { min: number; max: number } | null;
  /** Values a faulty sensor reports; refused even inside the range. */
  errorCodes: readonly number[];
};

const same = (unit: string | null): UnitRule => ({ unit, scale: 1, offset: 0 });

/** A numeric metric: SenML suffix, label, stored unit, what a screen prints, the units accepted
 * and the range outside which a value is a fault. */
const numeric = (
  key: MetricKey,
  suffix: string,
  label: string,
  unit: string | null,
  displayUnit: string,
  accepts: UnitRule[],
  [min, max]: [number, number],
  errorCodes: number[] = [],
): MetricSpec => ({
  key,
  suffix,
  label,
  kind: "number",
  unit,
  displayUnit,
  accepts,
  range: { min, max },
  errorCodes,
});

export const METRICS: Record<MetricKey, MetricSpec> = {
  // -55…125 °C: typical digital probe (DS18B20-style) datasheet range, from memory.
  // 85 °C is the power-on value of a DS18B20-style sensor never told to convert, and -127 °C what
  // common libraries return for a missing sensor (both from memory). A bed cannot reach 85 °C:
  // thermophilic composting tops out near 71 °C (K-State Research & Extension).
  temperature: numeric(
    "temperature",
    "temp",
    "Temperature",
    "Cel",
    "°C",
    [same("Cel"), same(null), { unit: "K", scale: 1, offset: -273.15 }],
    [-55, 125],
    [85, -127],
  ),
  // wet-basis moisture is a share of the wet mass: 0–100
  moisture: numeric("moisture", "moisture", "Moisture", "/100", "%", [same("/100"), same(null), { unit: "/", scale: 100, offset: 0 }], [0, 100]),
  // 0…65535: the full scale of a 16-bit converter; common practice
  "moisture-raw": numeric("moisture-raw", "moisture-raw", "Moisture (raw)", null, "", [same(null), same("count")], [0, 65_535]),
  // 0…1000 ppm: low-cost ammonia sensors span up to several hundred ppm (from memory)
  ammonia: numeric("ammonia", "nh3", "Ammonia", "ppm", "ppm", [same("ppm"), same(null), { unit: "/", scale: 1e6, offset: 0 }], [0, 1000]),
  // 0…15 V covers cells, AA packs and 12 V field batteries; common practice
  "battery-voltage": numeric("battery-voltage", "battery", "Battery", "V", "V", [same("V"), { unit: "mV", scale: 1 / 1000, offset: 0 }], [0, 15]),
  "battery-level": numeric("battery-level", "battery", "Battery", "%EL", "%", [same("%EL")], [0, 100]),
  // RFC 8798: dBm = dBW × 1 − 30, so dBW + 30 gives dBm. -150…0 dBm: below the best long-range radio
  // sensitivity, up to a radio beside the gateway; common practice
  signal: numeric("signal", "rssi", "Signal", "dBm", "dBm", [same("dBm"), same(null), { unit: "dBW", scale: 1, offset: 30 }], [-150, 0]),
  // a text value carries no unit; one inherited from bu is ignored
  firmware: { key: "firmware", suffix: "fw", label: "Firmware", kind: "string", unit: null, displayUnit: "", accepts: [], range: null, errorCodes: [] },
};

const MAX_TEXT = 64;

export function isProbeId(id: string): boolean {
  return PROBE_ID.test(id);
}

export function probeBaseName(probeId: string): string {
  return `${PROBE_URN_PREFIX}${probeId}:`;
}

export type MetricMatch = { probeId: string; metric: MetricKey; rule: UnitRule | null };

/** Which probe and metric a resolved SenML name and unit are, and how to convert the value. */
export function metricFromSenml(name: string, unit: string | undefined): { ok: true; match: MetricMatch } | { ok: false; reason: string } {
  if (!name.startsWith(PROBE_URN_PREFIX)) return { ok: false, reason: `name "${name}" is not ${PROBE_URN_PREFIX}<probe>:<metric>` };
  const rest = name.slice(PROBE_URN_PREFIX.length);
  const colon = rest.indexOf(":");
  const probeId = colon < 0 ? "" : rest.slice(0, colon);
  const suffix = colon < 0 ? "" : rest.slice(colon + 1);
  if (!isProbeId(probeId)) return { ok: false, reason: `name "${name}" does not hold a probe id` };
  const candidates = Object.values(METRICS).filter((m) => m.suffix === suffix);
  if (candidates.length === 0) return { ok: false, reason: `unknown metric "${suffix}"` };

  for (const spec of candidates) {
    if (spec.kind === "string") return { ok: true, match: { probeId, metric: spec.key, rule: null } };
    const rule = spec.accepts.find((r) => r.unit === (unit ?? null));
    if (rule) return { ok: true, match: { probeId, metric: spec.key, rule } };
  }
  const accepted = candidates.flatMap((m) => m.accepts.map((r) => r.unit).filter((u) => u !== null));
  const ratioHint = unit === "%" ? " ('%' is a ratio 0–1 in SenML, not a percentage: RFC 8428 §12.1 Note 2)" : "";
  return {
    ok: false,
    reason: `${unit === undefined ? "no unit" : `unit "${unit}"`} is not accepted for ${suffix}; use ${accepted.join(", ")}${ratioHint}`,
  };
}

/** time is seconds since the epoch, as SenML resolves it; value is in the metric's stored unit. */
export type Reading = { probeId: string; metric: MetricKey; time: number; value?: number; text?: string };

/** A resolved SenML record as a reading in stored units, or why it is refused. */
export function readingFromRecord(record: ResolvedRecord): { ok: true; reading: Reading } | { ok: false; reason: string } {
  const found = metricFromSenml(record.name, record.unit);
  if (!found.ok) return found;
  const { probeId, metric, rule } = found.match;
  const spec = METRICS[metric];

  if (spec.kind === "string") {
    if (record.stringValue === undefined) return { ok: false, reason: `${spec.suffix} needs a string value (vs)` };
    if (record.stringValue.length > MAX_TEXT) return { ok: false, reason: `${spec.suffix} is longer than ${MAX_TEXT} characters` };
    return { ok: true, reading: { probeId, metric, time: record.time, text: record.stringValue } };
  }

  if (record.value === undefined || rule === null) return { ok: false, reason: `${spec.suffix} needs a numeric value (v)` };
  const value = record.value * rule.scale + rule.offset;
  if (spec.errorCodes.some((code) => Math.abs(value - code) < 1e-9)) {
    return { ok: false, reason: `${value} ${spec.displayUnit} is a sensor error code, not a reading` };
  }
  if (spec.range && (value < spec.range.min || value > spec.range.max)) {
    return { ok: false, reason: `${value} ${spec.displayUnit} is outside ${spec.range.min}…${spec.range.max} ${spec.displayUnit}` };
  }
  return { ok: true, reading: { probeId, metric, time: record.time, value } };
}
