// What a probe sends, checked for the MQTT and HTTP ingest alike: size before parsing, JSON, SenML,
// then each record (lib/domain/metrics.ts, time window). A bad record never costs its message's good ones.
import type { Metric } from "@/lib/domain/vocabulary";
import { applyCalibration } from "./calibration";
import { METRICS, PROBE_URN_PREFIX, isProbeId, metricFromSenml, type MetricKey } from "./metrics";
import { parseSenml, type ResolvedRecord } from "./senml";

export type RejectCode =
  | "too-large"
  | "malformed-json"
  | "malformed-senml"
  | "unknown-metric"
  | "bad-unit"
  | "wrong-probe"
  | "out-of-range"
  | "sensor-error"
  | "too-far-ahead"
  | "too-old"
  | "bad-presence"
  | "retained";

// whole: the message could not be read as a SenML pack at all (no record was looked at).
// name: the record's resolved SenML name, when the refusal is about one record.
export type Rejection = { code: RejectCode; reason: string; whole?: true; name?: string };

export type TelemetryProbe = {
  id: number;
  code: string;
  calibration?: { slope: number; intercept: number } | null;
};

export type ReadingRow = { probeId: number; metric: Metric; ts: Date; value: number };

export type ProbeStatus = {
  seenAt: Date;
  batteryV?: number;
  signalDbm?: number;
  firmware?: string;
};

export type TelemetryLimits = {
  maxBytes: number;
  maxAheadMs: number;
  maxAgeMs: number;
};

export const DEFAULT_LIMITS: TelemetryLimits = {
  maxBytes: 16 * 1024,
  maxAheadMs: 5 * 60_000,
  maxAgeMs: 30 * 86_400_000,
};

export type ValidateOptions = { now?: Date; limits?: Partial<TelemetryLimits> };

export type ValidatedPayload = { readings: ReadingRow[]; rejections: Rejection[]; status: ProbeStatus };

const KNOWN_SUFFIXES = new Set(Object.values(METRICS).map((m) => m.suffix));

export const rejectionText = (r: Rejection) => `${r.code}: ${r.reason}`;

/** One rejected_messages row per refused message keeps this many reasons, each this long at most. */
export const REASONS_KEPT = 5;
export const REASON_LINE_MAX = 240;

const clip = (s: string, max: number) => (s.length > max ? `${s.slice(0, max - 1)}…` : s);

/**
 * The reason and record count stored for one message's refusals: the first refusal of each kind and
 * record name first (so a fault on every channel stays readable to the probe-fault rule), then the
 * next ones, REASONS_KEPT lines at most; a pack of 8,190 bad records is one row, not 8,190.
 */
export function summarizeRejections(rs: readonly Rejection[]): { reason: string; records: number } | null {
  if (rs.length === 0) return null;
  const seen = new Set<string>();
  const firsts: number[] = [];
  for (let i = 0; i < rs.length && firsts.length < REASONS_KEPT; i++) {
    const key = `${rs[i]!.code} ${rs[i]!.name ?? ""}`;
    if (!seen.has(key)) {
      seen.add(key);
      firsts.push(i);
    }
  }
  for (let i = 0; i < rs.length && firsts.length < REASONS_KEPT; i++) if (!firsts.includes(i)) firsts.push(i);
  return {
    reason: reasonLines(
      firsts.sort((a, b) => a - b).map((i) => rejectionText(rs[i]!)),
      rs.length,
    ),
    records: rs.length,
  };
}

// A reason quotes what was sent (a name, a unit, a cell). Control characters (PostgreSQL text cannot
// hold U+0000), lone surrogates and bidirectional controls (which turn the rest of a line around,
// Unicode UAX #9) are shown as U+XXXX instead.
const UNREADABLE = /[\p{Cc}\p{Cs}\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/gu;
export const readable = (s: string) => s.replace(UNREADABLE, (c) => `U+${c.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}`);

/** The first reasons, one a line and each clipped, and how many more there were out of `total`. */
export function reasonLines(first: readonly string[], total: number): string {
  const lines = first.slice(0, REASONS_KEPT).map((l) => clip(readable(l), REASON_LINE_MAX));
  const more = total - lines.length;
  if (more > 0) lines.push(`and ${more} more record${more === 1 ? "" : "s"} refused`);
  return lines.join("\n");
}

// ECMA-262 §21.4.1.22 (Time Values and Time Range): a Date holds ±8.64e15 ms around the epoch;
// past that, toISOString throws, so a time that far out is shown as the seconds the probe sent.
const MAX_DATE_MS = 8.64e15;
const shownTime = (ms: number, seconds: number) => (Math.abs(ms) <= MAX_DATE_MS ? new Date(ms).toISOString() : `t=${seconds} s`);

// PostgreSQL text cannot hold U+0000.
export function excerptOf(payload: Buffer | string, maxBytes = 200): string {
  const buf = typeof payload === "string" ? Buffer.from(payload, "utf8") : payload;
  return buf
    .subarray(0, maxBytes)
    .toString("utf8")
    .replace(/\u0000/g, "\uFFFD");
}

type Checked = { ok: true; key: MetricKey; value: number | string; time: number } | { ok: false; rejection: Rejection };

function checkRecord(probe: TelemetryProbe, rec: ResolvedRecord, limits: TelemetryLimits, nowMs: number): Checked {
  const bad = (code: RejectCode, reason: string): Checked => ({ ok: false, rejection: { code, reason, name: rec.name } });
  const found = metricFromSenml(rec.name, rec.unit);
  if (!found.ok) {
    const rest = rec.name.startsWith(PROBE_URN_PREFIX) ? rec.name.slice(PROBE_URN_PREFIX.length) : "";
    const colon = rest.indexOf(":");
    const known = colon > 0 && isProbeId(rest.slice(0, colon)) && KNOWN_SUFFIXES.has(rest.slice(colon + 1));
    return bad(known ? "bad-unit" : "unknown-metric", found.reason);
  }
  const { probeId, metric, rule } = found.match;
  if (probeId !== probe.code) return bad("wrong-probe", `record names probe "${probeId}" but was sent by "${probe.code}"`);

  const ms = rec.time * 1000;
  // Written so that NaN fails too: it would pass both "ahead" and "old" comparisons.
  if (!(ms <= nowMs + limits.maxAheadMs)) {
    return bad("too-far-ahead", `${rec.name} at ${shownTime(ms, rec.time)} is more than ${limits.maxAheadMs / 60_000} min ahead`);
  }
  if (!(ms >= nowMs - limits.maxAgeMs)) {
    return bad("too-old", `${rec.name} at ${shownTime(ms, rec.time)} is more than ${limits.maxAgeMs / 86_400_000} days old`);
  }

  const spec = METRICS[metric];
  if (spec.kind === "string") {
    if (rec.stringValue === undefined) return bad("malformed-senml", `${spec.suffix} needs a string value (vs)`);
    if (rec.stringValue.length > 64 || /[\u0000-\u001f]/.test(rec.stringValue)) {
      return bad("out-of-range", `${spec.suffix} must be at most 64 printable characters`);
    }
    return { ok: true, key: metric, value: rec.stringValue, time: ms };
  }
  if (rec.value === undefined || rule === null) return bad("malformed-senml", `${spec.suffix} needs a numeric value (v)`);
  const value = rec.value * rule.scale + rule.offset;
  // bv + v can overflow to Infinity (RFC 8428 §4.5.4 adds them); PostgreSQL float8 would store it.
  if (!Number.isFinite(value)) return bad("out-of-range", `${rec.name} = ${value} ${spec.displayUnit} is not a finite number`);
  if (spec.errorCodes.some((code) => Math.abs(value - code) < 1e-9)) {
    return bad("sensor-error", `${rec.name} = ${value} ${spec.displayUnit} is a sensor error code, not a reading`);
  }
  if (spec.range && (value < spec.range.min || value > spec.range.max)) {
    return bad("out-of-range", `${rec.name} = ${value} ${spec.displayUnit} is outside ${spec.range.min}…${spec.range.max} ${spec.displayUnit}`);
  }
  return { ok: true, key: metric, value, time: ms };
}

// probes.battery_v and signal_dbm are real (float4), which refuses a non-zero value that would round
// to 0 (SQLSTATE 22003, e.g. 5e-324 V) and took the message's good readings down with it. Below
// float4's smallest normal (IEEE 754 binary32) the status says 0; the reading keeps its double.
const FLOAT4_MIN_NORMAL = 1.1754943508222875e-38;
const asReal = (v: number) => (Math.abs(v) < FLOAT4_MIN_NORMAL ? 0 : v);

const validCalibration = (c: TelemetryProbe["calibration"]) => (c && Number.isFinite(c.slope) && Number.isFinite(c.intercept) ? c : null);

// One decoder for every payload: a whole-buffer decode keeps no state between calls.
const utf8 = new TextDecoder("utf-8", { fatal: true });

export function validateSenmlPayload(probe: TelemetryProbe, payload: Buffer | string, opts: ValidateOptions = {}): ValidatedPayload {
  const limits = { ...DEFAULT_LIMITS, ...opts.limits };
  const now = opts.now ?? new Date();
  const status: ProbeStatus = { seenAt: now };
  const readings: ReadingRow[] = [];
  const rejections: Rejection[] = [];
  const result = () => ({ readings, rejections, status });

  const size = typeof payload === "string" ? Buffer.byteLength(payload, "utf8") : payload.length;
  if (size > limits.maxBytes) {
    rejections.push({ code: "too-large", reason: `payload is ${size} bytes; at most ${limits.maxBytes} are accepted` });
    return result();
  }
  let json: unknown;
  try {
    const text = typeof payload === "string" ? payload : utf8.decode(payload);
    json = JSON.parse(text);
  } catch {
    rejections.push({ code: "malformed-json", reason: "payload is not UTF-8 JSON (RFC 8428 §5)", whole: true });
    return result();
  }
  const parsed = parseSenml(json, { now: now.getTime() / 1000 });
  if (!parsed.ok) {
    rejections.push({ code: "malformed-senml", reason: parsed.reason, whole: true });
    return result();
  }
  for (const e of parsed.errors) rejections.push({ code: "malformed-senml", reason: `record ${e.index}: ${e.reason}` });

  const calibration = validCalibration(probe.calibration);
  const explicitMoisture = new Set<number>();
  const raws: { ts: number; raw: number }[] = [];
  const latest: Partial<Record<"battery" | "signal" | "firmware", number>> = {};
  const newer = (field: "battery" | "signal" | "firmware", t: number) => {
    if ((latest[field] ?? -Infinity) > t) return false;
    latest[field] = t;
    return true;
  };

  for (const rec of parsed.records) {
    const c = checkRecord(probe, rec, limits, now.getTime());
    if (!c.ok) {
      rejections.push(c.rejection);
      continue;
    }
    if (c.key === "firmware") {
      if (newer("firmware", c.time)) status.firmware = c.value as string;
      continue;
    }
    const value = c.value as number;
    const metric: Metric = c.key;
    if (metric === "battery-voltage" && newer("battery", c.time)) status.batteryV = asReal(value);
    if (metric === "signal" && newer("signal", c.time)) status.signalDbm = asReal(value);
    readings.push({ probeId: probe.id, metric, ts: new Date(c.time), value });
    if (metric === "moisture") explicitMoisture.add(c.time);
    if (metric === "moisture-raw") raws.push({ ts: c.time, raw: value });
  }
  // A probe that sends a calibrated value itself keeps it; otherwise its raw count is calibrated here.
  if (calibration) {
    for (const { ts, raw } of raws) {
      if (explicitMoisture.has(ts)) continue;
      const value = applyCalibration(calibration, raw);
      if (value !== null) readings.push({ probeId: probe.id, metric: "moisture", ts: new Date(ts), value });
    }
  }
  return result();
}
