/** The farm-local calendar date ("YYYY-MM-DD") and minutes past midnight at an instant. */
export function localClock(now: Date, timeZone: string): { date: string; minutes: number } {
  const parts = new Intl.DateTimeFormat("en-CA", {
    timeZone,
    hourCycle: "h23",
    year: "numeric",
    month: "2-digit",
    day: "2-digit",
    hour: "2-digit",
    minute: "2-digit",
  }).formatToParts(now);
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? "00";
  return { date: `${get("year")}-${get("month")}-${get("day")}`, minutes: Number(get("hour")) * 60 + Number(get("minute")) };
}

/** Offset of a time zone from UTC at an instant, in ms (Intl has no direct call for it). */
function zoneOffset(utcMs: number, timeZone: string): number {
  const parts = new Intl.DateTimeFormat("en-US", {
    timeZone,
    hourCycle: "h23",
    year: "numeric",
    month: "2-digit",
    day: "2-digit",
    hour: "2-digit",
    minute: "2-digit",
    second: "2-digit",
  }).formatToParts(new Date(utcMs));
  const get = (type: string) => Number(parts.find((p) => p.type === type)?.value);
  const asUtc = Date.UTC(get("year"), get("month") - 1, get("day"), get("hour"), get("minute"), get("second"));
  return asUtc - Math.floor(utcMs / 1000) * 1000;
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
