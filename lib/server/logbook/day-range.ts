import { zonedToUtc } from "@/lib/domain/clock";

const wallMidnight = (day: string, plusDays = 0) => Date.UTC(+day.slice(0, 4), +day.slice(5, 7) - 1, +day.slice(8, 10) + plusDays);

/** Farm-local days, both inclusive, as instants: from the first day's midnight to the midnight after
 * the last day, in the farm's time zone (so a day across a DST change is 23 or 25 hours). */
export function farmDayRange(from: string | undefined, to: string | undefined, timeZone: string): { from?: Date; to?: Date } {
  return {
    from: from ? new Date(zonedToUtc(wallMidnight(from), timeZone)) : undefined,
    to: to ? new Date(zonedToUtc(wallMidnight(to, 1), timeZone)) : undefined,
  };
}
