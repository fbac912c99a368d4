// SenML JSON (RFC 8428) to resolved records (§4.6). Good records are kept when another record
// of the same pack is bad, so the ingest can store them and record the bad ones with a reason;
// only a pack that cannot be read at all is refused whole.

export type ResolvedRecord = {
  name: string;
  unit?: string;
  /** Seconds since the Unix epoch (float). */
  time: number;
  value?: number;
  stringValue?: string;
  boolValue?: boolean;
  /** base64url, unpadded, as carried. */
  dataValue?: string;
  sum?: number;
  updateTime?: number;
  /** Present only when the pack declares a version other than 10 (§4.6). */
  version?: number;
};

export type SenmlRecordError = { index: number; reason: string };

export type SenmlParseResult = { ok: true; records: ResolvedRecord[]; errors: SenmlRecordError[] } | { ok: false; reason: string };

export type SenmlOptions = {
  /** "Now" in seconds since the epoch, for relative times; defaults to the clock. */
  now?: number;
  /** Larger packs are refused whole. */
  maxRecords?: number;
};

/** §4.1: Version defaults to 10. */
export const SENML_VERSION = 10;
/** §4.5.3: times below 2**28 are relative to now. */
export const RELATIVE_TIME_LIMIT = 2 ** 28;
export const DEFAULT_MAX_RECORDS = 10_000;

// §4.5.1 (RFC 8428 final text, which added "/" to the draft's set)
const NAME = /^[A-Za-z0-9][A-Za-z0-9\-:./_]*$/;
// Table 1 note: Data Value is base64url with padding omitted (RFC 4648 §5)
const BASE64URL = /^[A-Za-z0-9_-]*$/;

const REGULAR_LABELS = ["n", "u", "v", "vs", "vb", "vd", "s", "t", "ut"] as const;
const BASE_LABELS = ["bn", "bt", "bu", "bv", "bs", "bver"] as const;

type BaseLabel = "bn" | "bt" | "bu" | "bv" | "bs";
type Base = { state: "unset" } | { state: "set"; value: string | number } | { state: "bad"; index: number };
type BaseState = Record<BaseLabel, Base>;

const isObject = (x: unknown): x is Record<string, unknown> => typeof x === "object" && x !== null && !Array.isArray(x);
const isNumber = (x: unknown): x is number => typeof x === "number" && Number.isFinite(x);
const isString = (x: unknown): x is string => typeof x === "string";

function decode(input: unknown): { ok: true; value: unknown } | { ok: false; reason: string } {
  let text: string;
  if (input instanceof Uint8Array) {
    try {
      text = new TextDecoder("utf-8", { fatal: true }).decode(input);
    } catch {
      return { ok: false, reason: "payload is not UTF-8 (RFC 8428 §5)" };
    }
  } else if (typeof input === "string") {
    text = input;
  } else {
    return { ok: true, value: input };
  }
  try {
    return { ok: true, value: JSON.parse(text) as unknown };
  } catch {
    return { ok: false, reason: "payload is not JSON" };
  }
}

/** §4.4: one version for the whole pack, and none newer than we understand. */
function packVersion(pack: readonly unknown[]): { ok: true; version: number } | { ok: false; reason: string } {
  let current = SENML_VERSION;
  let seen: number | null = null;
  for (const [i, rec] of pack.entries()) {
    if (isObject(rec) && "bver" in rec) {
      const v = rec.bver;
      if (!isNumber(v) || !Number.isInteger(v) || v < 1) {
        return { ok: false, reason: `record ${i}: bver must be a positive integer (RFC 8428 §4.1)` };
      }
      current = v;
    }
    if (seen !== null && current !== seen) {
      return { ok: false, reason: "records carry different versions; all must have the same (RFC 8428 §4.4)" };
    }
    seen = current;
  }
  if (current > SENML_VERSION) {
    return { ok: false, reason: `version ${current} is newer than ${SENML_VERSION}; must not be used (RFC 8428 §4.4)` };
  }
  return { ok: true, version: current };
}

const BASE_TYPES: Record<BaseLabel, (x: unknown) => boolean> = {
  bn: isString,
  bt: isNumber,
  bu: isString,
  bv: isNumber,
  bs: isNumber,
};

/** Reads every base field of a record into the state; returns the first problem, or null. */
function readBases(rec: Record<string, unknown>, index: number, base: BaseState): string | null {
  let problem: string | null = null;
  for (const label of Object.keys(BASE_TYPES) as BaseLabel[]) {
    if (!(label in rec)) continue;
    const value = rec[label];
    if (BASE_TYPES[label](value)) {
      base[label] = { state: "set", value: value as string | number };
    } else {
      base[label] = { state: "bad", index };
      problem ??= `${label} has the wrong type (RFC 8428 §5, Table 2)`;
    }
  }
  return problem;
}

// Only values that passed BASE_TYPES are ever stored, so the casts below hold.
const baseString = (b: Base): string | undefined => (b.state === "set" ? (b.value as string) : undefined);
const baseNumber = (b: Base): number | undefined => (b.state === "set" ? (b.value as number) : undefined);

function checkRegular(rec: Record<string, unknown>): string | null {
  const types: Record<(typeof REGULAR_LABELS)[number], (x: unknown) => boolean> = {
    n: isString,
    u: isString,
    v: isNumber,
    vs: isString,
    vb: (x) => typeof x === "boolean",
    vd: isString,
    s: isNumber,
    t: isNumber,
    ut: isNumber,
  };
  for (const label of REGULAR_LABELS) {
    if (label in rec && !types[label](rec[label])) return `${label} has the wrong type (RFC 8428 §5, Table 2)`;
  }
  if (isString(rec.vd) && (!BASE64URL.test(rec.vd) || rec.vd.length % 4 === 1)) {
    return "vd is not unpadded base64url (RFC 8428 §4.3, Table 1)";
  }
  if (isNumber(rec.ut) && rec.ut < 0) return "ut is a period and cannot be negative (RFC 8428 §4.2)";
  return null;
}

/** Resolves a SenML JSON pack: a string, UTF-8 bytes, or an already parsed value. */
export function parseSenml(input: unknown, opts: SenmlOptions = {}): SenmlParseResult {
  const decoded = decode(input);
  if (!decoded.ok) return decoded;
  const pack = decoded.value;
  if (!Array.isArray(pack)) return { ok: false, reason: "a SenML pack is a JSON array of records (RFC 8428 §5)" };
  if (pack.length === 0) return { ok: false, reason: "the pack has no records (RFC 8428 §11, SenML-Pack = [1* record])" };
  const max = opts.maxRecords ?? DEFAULT_MAX_RECORDS;
  if (pack.length > max) return { ok: false, reason: `the pack has ${pack.length} records; at most ${max} are accepted` };
  const version = packVersion(pack);
  if (!version.ok) return version;

  const now = opts.now ?? Date.now() / 1000;
  if (!isNumber(now)) return { ok: false, reason: "the time 'now' given to the parser is not a number" };
  const unset: Base = { state: "unset" };
  const base: BaseState = { bn: unset, bt: unset, bu: unset, bv: unset, bs: unset };
  const records: ResolvedRecord[] = [];
  const errors: SenmlRecordError[] = [];

  for (const [index, rec] of pack.entries()) {
    const reason = resolveOne(rec, index, base, now, version.version, records);
    if (reason) errors.push({ index, reason });
  }
  // §4.6: resolved records are in chronological order (sort is stable, so ties keep pack order).
  records.sort((a, b) => a.time - b.time);
  return { ok: true, records, errors };
}

/** Resolves one record into `out`; returns why it was refused, or null. */
function resolveOne(rec: unknown, index: number, base: BaseState, now: number, version: number, out: ResolvedRecord[]): string | null {
  if (!isObject(rec)) return "a record must be a JSON object (RFC 8428 §5)";
  // Base fields are read first, even from a record refused later, so that later records inherit them (§4).
  const baseProblem = readBases(rec, index, base);
  if (baseProblem) return baseProblem;
  const mandatory = Object.keys(rec).find((k) => k.endsWith("_"));
  if (mandatory) return `unknown field "${mandatory}" must be understood (RFC 8428 §4.4)`;
  const regularProblem = checkRegular(rec);
  if (regularProblem) return regularProblem;

  const hasRegular = REGULAR_LABELS.some((l) => l in rec);
  // RFC 8428 §5.1.7 opens a pack with a record that only sets a base name: a carrier of base
  // fields, not a measurement.
  if (!hasRegular && !("bv" in rec) && !("bs" in rec)) {
    return BASE_LABELS.some((l) => l in rec) ? null : "the record has no name and no value (RFC 8428 §4.2)";
  }

  const inherited = (label: BaseLabel): string | null => {
    const b = base[label];
    return b.state === "bad" ? `inherits ${label} from record ${b.index}, which was refused` : null;
  };
  const valueFields = (["v", "vs", "vb", "vd"] as const).filter((l) => l in rec);
  const numeric = valueFields.length === 0 || valueFields[0] === "v";
  const inheritProblem =
    inherited("bn") ?? inherited("bt") ?? inherited("bs") ?? (!("u" in rec) ? inherited("bu") : null) ?? (numeric ? inherited("bv") : null);
  if (inheritProblem) return inheritProblem;

  const name = (baseString(base.bn) ?? "") + ((rec.n as string | undefined) ?? "");
  if (name === "") return "the record has no name: give n or bn (RFC 8428 §4.5.1)";
  if (!NAME.test(name)) {
    return `name "${name}" must start with a letter or digit and use only A–Z a–z 0–9 - : . / _ (RFC 8428 §4.5.1)`;
  }

  if (valueFields.length > 1) return `more than one value field (${valueFields.join(", ")}); exactly one is allowed (RFC 8428 §4.2)`;
  const bv = baseNumber(base.bv);
  const bs = baseNumber(base.bs);
  const v = rec.v as number | undefined;
  const s = rec.s as number | undefined;
  const hasNumber = numeric && (v !== undefined || bv !== undefined);
  const hasSum = s !== undefined || bs !== undefined;
  if (valueFields.length === 0 && !hasNumber && !hasSum) return "the record has no value and no sum (RFC 8428 §4.2)";

  // §4.5.3: missing Base Time or Time counts as zero; the sum, if below 2**28, is relative to now.
  const total = (baseNumber(base.bt) ?? 0) + ((rec.t as number | undefined) ?? 0);
  // Two finite JSON numbers can add up to Infinity; no time is that far (§4.5.3 counts seconds).
  if (!Number.isFinite(total)) return "bt + t is not a finite number of seconds (RFC 8428 §4.5.3)";
  const resolved: ResolvedRecord = { name, time: total < RELATIVE_TIME_LIMIT ? now + total : total };
  const unit = (rec.u as string | undefined) ?? baseString(base.bu);
  if (unit) resolved.unit = unit;
  // §4.5.4: a missing Base Value or Value counts as zero; they add.
  if (hasNumber) resolved.value = (bv ?? 0) + (v ?? 0);
  if (isString(rec.vs)) resolved.stringValue = rec.vs;
  if (typeof rec.vb === "boolean") resolved.boolValue = rec.vb;
  if (isString(rec.vd)) resolved.dataValue = rec.vd;
  if (hasSum) resolved.sum = (bs ?? 0) + (s ?? 0);
  if (isNumber(rec.ut)) resolved.updateTime = rec.ut;
  if (version !== SENML_VERSION) resolved.version = version;
  out.push(resolved);
  return null;
}
