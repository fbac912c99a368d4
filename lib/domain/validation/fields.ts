// Building blocks every input schema in lib/domain/validation/ is made of, so bad input is refused with
// the field's name before it reaches PostgreSQL (which would answer a NUL byte, an underflowing
// `real` or a year 300000 with an error the person cannot act on).
import { z } from "zod";
import { localClock, zonedToUtc } from "@/lib/domain/clock";
import { UNIT_LABELS, lengthForDisplay, massForDisplay, volumeForDisplay, type UnitSystem } from "@/lib/domain/units";

// C0 controls, DEL and C1 controls (Unicode general category Cc), and lone surrogates (Cs), which
// PostgreSQL cannot store (U+0000: text 22021, jsonb 22P05) or which would silently become U+FFFD.
const CONTROL = /[\p{Cc}\p{Cs}]/u;
// Where text is meant to run over lines, newlines and tabs are writing, not control.
const CONTROL_BUT_LINES = /[^\P{Cc}\t\n\r]|\p{Cs}/u;

const hex = (ch: string) => `U+${ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}`;
const controlMessage = (what: string, s: string, re: RegExp) => `${what} has a control character (${hex(re.exec(s)![0])}) in it; type it again without it.`;

type TextOptions = { min?: number; max: number; empty?: string };

function text(what: string, o: TextOptions, re: RegExp) {
  let s = z.string({ message: `${what} must be text.` }).trim();
  if (o.min) s = s.min(o.min, o.empty ?? `${what} cannot be empty.`);
  return s.max(o.max, `Keep ${what.toLowerCase()} under ${o.max} characters.`).superRefine((v, ctx) => {
    if (re.test(v)) ctx.addIssue({ code: "custom", message: controlMessage(what, v, re) });
  });
}

/** One line of plain text (a name, a label): trimmed, no control characters at all. */
export const plainText = (what: string, o: TextOptions) => text(what, o, CONTROL);
/** Text that may run over lines (notes): newlines and tabs allowed, other control characters not. */
export const longText = (what: string, o: TextOptions) => text(what, o, CONTROL_BUT_LINES);
/** A string that is checked for control characters without trimming (file names, column names). */
export const hasControl = (s: string) => CONTROL.test(s);

// Smallest positive normal float4 (IEEE 754 binary32): PostgreSQL's `real` refuses anything
// smaller but non-zero (22003). Every `min` below is far above it.
const FLOAT4_MIN_NORMAL = 1.1754943508222875e-38;

type QuantityOptions = {
  /** Smallest non-zero value that is still a measurement, in the stored unit. */
  min: number;
  max: number;
  /** Whether 0 itself is allowed (a tare, a dry mass); values between 0 and `min` never are. */
  zero?: boolean;
  /** How to say `min` in words on a metric farm, e.g. "1 g". */
  minWords?: string;
};

/** How a bound is said: in the stored unit as it is, or converted (`show`) to the farm's units. */
type Saying = { unit: string; show?: (stored: number) => number };

/** What a stored amount measures; each is stored metric (kg, L, cm) and said in the farm's units. */
export type Measure = "mass" | "volume" | "length";
const TO_DISPLAY = { mass: massForDisplay, volume: volumeForDisplay, length: lengthForDisplay } as const;

// A converted bound is said with three significant figures, rounded inward (a maximum down, a
// minimum up), so the number said is itself accepted: 10 000 kg is "22000 lb", not "22046.2 lb".
const inward = (v: number, up: boolean) => {
  if (v === 0) return 0;
  const step = 10 ** (Math.floor(Math.log10(Math.abs(v))) - 2);
  const n = (up ? Math.ceil(v / step - 1e-9) : Math.floor(v / step + 1e-9)) * step;
  return Number(n.toPrecision(3));
};

function amountChecks(what: string, o: QuantityOptions, say: Saying) {
  const amount = (stored: number, up: boolean) => {
    const shown = say.show ? inward(say.show(stored), up) : stored;
    return say.unit ? `${shown} ${say.unit}` : `${shown}`;
  };
  // z.number() already refuses NaN and ±Infinity (zod 4); JSON cannot carry them anyway.
  return z.number({ message: `${what} must be a number.` }).superRefine((v, ctx) => {
    const issue = (message: string) => ctx.addIssue({ code: "custom", message });
    // "More than 0" needs no unit, so it reads the same on every farm.
    if (v <= 0 && !o.zero) issue(`${what} must be more than 0.`);
    else if (v < 0) issue(`${what} cannot be negative.`);
    else if (v > 0 && v < o.min) issue(`${what} is too small to be measured; the smallest is ${(!say.show && o.minWords) || amount(o.min, true)}.`);
    else if (v > o.max) issue(`${what} cannot be over ${amount(o.max, false)}.`);
  });
}

function checkMin(what: string, o: QuantityOptions) {
  if (o.min <= FLOAT4_MIN_NORMAL) throw new Error(`quantity ${what}: min must be a real measurement`);
}

/** A measured amount in a unit that is the same on every farm (g, %, a ratio): a finite JSON
 * number within a sensible range for a worm bin. Not finite, subnormal and too-fine values are
 * refused with the field named. */
export function quantity(what: string, unit: string, o: QuantityOptions) {
  checkMin(what, o);
  return amountChecks(what, o, { unit });
}

/** A mass, volume or length, stored metric (`o` in kg, L or cm) and refused in the farm's units:
 * on an imperial farm "Mass cannot be over 22000 lb.", the limit checked is the same. */
export function measured(what: string, measure: Measure, system: UnitSystem, o: QuantityOptions) {
  checkMin(what, o);
  const unit = UNIT_LABELS[system][measure];
  if (system === "metric") return amountChecks(what, o, { unit });
  return amountChecks(what, o, { unit, show: (v) => TO_DISPLAY[measure](v, system) });
}

/** A schema built once per unit system, for inputs whose refusals name the farm's units. */
export function perUnitSystem<T>(build: (system: UnitSystem) => T): (system: UnitSystem) => T {
  const made = { metric: build("metric"), imperial: build("imperial") };
  return (system) => made[system];
}

// Lab reports give moisture, carbon and nitrogen to two decimals (TMECC 03.09, 04.01), so a
// non-zero percentage finer than 0.001 % is a typo or an attack, not a measurement.
const PCT_RESOLUTION = 0.001;
/** A percentage 0–100; `positive` refuses 0 (nitrogen, which a C:N divides by). */
export const percent = (what: string, o: { positive?: boolean } = {}) => quantity(what, "%", { min: PCT_RESOLUTION, max: 100, zero: !o.positive });

// Smallest positive normal float8 (IEEE 754 binary64); below it a value is subnormal.
const FLOAT8_MIN_NORMAL = 2.2250738585072014e-308;

/** A reading without a unit of ours (a raw sensor count): finite, in range, not subnormal. */
export const finiteNumber = (what: string, o: { min: number; max: number }) =>
  z
    .number({ message: `${what} must be a number.` })
    .refine((v) => v === 0 || Math.abs(v) >= FLOAT8_MIN_NORMAL, `${what} is too small to be a reading.`)
    .refine((v) => v >= o.min && v <= o.max, `${what} must be between ${o.min} and ${o.max}.`);

/** How far ahead of the server a phone's or a logger's clock may run; the same for telemetry,
 * CSV imports and the logbook. */
export const FUTURE_SLACK_MS = 5 * 60_000;
/** Nothing a keeper logs or a logger recorded is from before this (a logger that lost power
 * restarts at 1970 or 2000; Wormward logbooks start long after). Common practice, not a standard. */
export const EARLIEST_MS = Date.UTC(2000, 0, 1);

// RFC 3339 §5.6 date-time: the zone is required, so "when" never depends on the server's zone.
const RFC3339 = /^(\d{4})-(\d{2})-(\d{2})[Tt ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?([Zz]|[+-]\d{2}:\d{2})$/;

/** An instant given as an RFC 3339 date-time with a zone, on a real calendar day, from 2000 on;
 * `future: false` also refuses more than FUTURE_SLACK_MS ahead of now. */
export function instant(what: string, o: { future?: boolean } = {}) {
  const example = "2025-05-01T14:30:00Z";
  return z
    .string({ message: `Give ${what} as a date and time with its zone, e.g. ${example}.` })
    .trim()
    .transform((s, ctx) => {
      const m = RFC3339.exec(s);
      const t = m ? Date.parse(s.replace(" ", "T")) : Number.NaN;
      // Date.parse rolls 2025-02-30 into March; a real calendar day survives the round trip.
      const day = m ? new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!)) : null;
      const real = day && day.getUTCMonth() === +m![2]! - 1 && day.getUTCDate() === +m![3]! && +m![4]! < 24 && +m![5]! < 60 && +(m![6] ?? 0) < 60;
      if (!m || Number.isNaN(t) || !real) {
        ctx.addIssue({ code: "custom", message: `Give ${what} as a date and time with its zone, e.g. ${example}.` });
        return z.NEVER;
      }
      if (t < EARLIEST_MS) {
        ctx.addIssue({ code: "custom", message: `${cap(what)} is before 2000; check the year.` });
        return z.NEVER;
      }
      if (o.future === false && t > Date.now() + FUTURE_SLACK_MS) {
        ctx.addIssue({ code: "custom", message: `${cap(what)} is in the future; log work once it is done.` });
        return z.NEVER;
      }
      return new Date(t);
    });
}
const cap = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** When logged work was done: back-dating is fine, the future and the last century are not. */
export const loggedAt = instant("the time of the work", { future: false });

/**
 * A time zone the whole app can use: Intl knows it (IANA names as ICU has them, e.g.
 * Europe/Dublin; `Intl.supportedValuesOf` lists the canonical ones, the formatter also takes
 * links such as US/Pacific), and the app's own clock code, which the settings page, quiet hours
 * and the digest run on, works with it.
 */
export function usableTimeZone(tz: string): boolean {
  // IANA names are ASCII letters, digits, "/", "_", "-" and "+" (tz-link.html, "Names of timezones").
  if (!/^[A-Za-z][A-Za-z0-9/_+-]{0,63}$/.test(tz)) return false;
  try {
    const now = new Date();
    new Date(0).toLocaleDateString("en-GB", { timeZone: tz, day: "numeric", month: "short", year: "numeric" });
    const { date, minutes } = localClock(now, tz);
    const wall = Date.UTC(+date.slice(0, 4), +date.slice(5, 7) - 1, +date.slice(8, 10), Math.floor(minutes / 60), minutes % 60);
    return Number.isFinite(zonedToUtc(wall, tz)) && /^\d{4}-\d{2}-\d{2}$/.test(date);
  } catch {
    return false;
  }
}

// The canonical spelling of a zone Intl lists, so "europe/dublin" is stored as Europe/Dublin.
let listed: Map<string, string> | null = null;
function canonical(tz: string): string {
  listed ??= new Map([...Intl.supportedValuesOf("timeZone"), "UTC"].map((z) => [z.toLowerCase(), z]));
  return listed.get(tz.toLowerCase()) ?? tz;
}

/** A farm's or a person's time zone, the same rule for the API and the forms. */
export const timeZone = z
  .string({ message: "Choose a time zone." })
  .trim()
  .min(1, "Choose a time zone.")
  .max(64, "Use a time zone name such as Europe/Dublin.")
  .refine(usableTimeZone, "Unknown time zone; use a name such as Europe/Dublin or UTC.")
  .transform(canonical);

/** A stored time zone, or UTC when it is one the app cannot use (stored before the API checked
 * them), so the pages that show times, and the settings page that fixes it, still open. */
export const timeZoneOrUtc = (tz: string) => (usableTimeZone(tz) ? tz : "UTC");
