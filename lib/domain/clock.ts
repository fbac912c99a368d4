// Building an Intl.DateTimeFormat costs far more than using one, and the rules build words many times
// a second on a replay: one formatter per zone and options, kept (time zones are few).
const formatters = new Map<string, Intl.DateTimeFormat>();
function formatter(locale: string, opts: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${locale}|${JSON.stringify(opts)}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(locale, opts);
    formatters.set(key, f);
  }
  return f;
}

// The wall clock of a time zone at an instant, as numbers (Intl has no direct call for it).
function wallParts(utcMs: number, timeZone: string) {
  const parts = formatter("en-US", {
    timeZone,
    hourCycle: "h23",
    year: "numeric",
    month: "2-digit",
    day: "2-digit",
    hour: "2-digit",
    minute: "2-digit",
    second: "2-digit",
  }).formatToParts(new Date(utcMs));
  const get = (type: string) => Number(parts.find((p) => p.type === type)?.value ?? 0);
  return { year: get("year"), month: get("month"), day: get("day"), hour: get("hour"), minute: get("minute"), second: get("second") };
}

/** The farm-local calendar date ("YYYY-MM-DD") and minutes past midnight at an instant. */
export function localClock(now: Date, timeZone: string): { date: string; minutes: number } {
  const w = wallParts(now.getTime(), timeZone);
  const pad = (n: number) => String(n).padStart(2, "0");
  return { date: `${w.year}-${pad(w.month)}-${pad(w.day)}`, minutes: w.hour * 60 + w.minute };
}

/** Offset of a time zone from UTC at an instant, in ms. */
function zoneOffset(utcMs: number, timeZone: string): number {
  const w = wallParts(utcMs, timeZone);
  return Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second) - Math.floor(utcMs / 1000) * 1000;
}

/** A wall-clock time in a zone to UTC ms; in a DST overlap the earlier instant wins, in a gap the
 * offset from before the change is used (the time then lands after the gap). */
export function zonedToUtc(wall: number, timeZone: string): number {
  const day = 86_400_000;
  const before = zoneOffset(wall - day, timeZone);
  const after = zoneOffset(wall + day, timeZone);
  const valid = [before, after].map((o) => wall - o).filter((t) => wall - zoneOffset(t, timeZone) === t);
  return valid.length > 0 ? Math.min(...valid) : wall - before;
}

/** A formatter of instants in the farm's time zone (ECMA-402 Intl.DateTimeFormat, en-GB, 24-hour);
 * an unknown zone falls back to UTC rather than failing the page. */
export function zonedFormat(timeZone: string, opts: Intl.DateTimeFormatOptions): (t: string | number | Date) => string {
  let fmt: Intl.DateTimeFormat;
  try {
    fmt = formatter("en-GB", { ...opts, hourCycle: "h23", timeZone });
  } catch {
    fmt = formatter("en-GB", { ...opts, hourCycle: "h23", timeZone: "UTC" });
  }
  return (t) => fmt.format(new Date(t));
}
