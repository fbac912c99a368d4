import { getBinCycleFacts } from "@/db/queries/bins";
import type { BinStyle, ZoneKind } from "@/lib/domain/vocabulary";
import { feedingInterval, harvestEstimate, harvestSideZone, harvestsPerMonth, localDate, nextFeeding, plannedHarvestWords } from "@/lib/domain/bin-cycle";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";

/** Daily moisture means over this many days make the harvest side's drying trend (common practice:
 * two weeks follows the drying of a side left alone and forgets an old watering). */
const TREND_DAYS = 14;
/** The yields chart looks back two years. */
const YIELD_DAYS = 730;

type CycleBin = {
  id: string;
  style: BinStyle;
  zones: { id: string; kind: ZoneKind; name: string | null; position: number }[];
  feedingIntervalDays: number | null;
  plannedHarvestOn: string | null;
};

/** A bin's cycle as its page says it: the next feeding, the harvest side's estimate with its
 * reasoning, the planned harvest beside it, and the castings harvested per harvest and per month. */
export async function readBinCycle(bin: CycleBin, place: { timezone: string; feedingIntervalDays: number }, now = new Date()) {
  // A time zone stored before the API checked them must not break the page.
  const farm = { ...place, timezone: timeZoneOrUtc(place.timezone) };
  const today = localDate(now, farm.timezone);
  const side = harvestSideZone(bin.style, bin.zones);
  const facts = await getBinCycleFacts(bin.id, side?.id ?? null, {
    since: new Date(now.getTime() - TREND_DAYS * 86_400_000),
    until: now,
    harvestsSince: new Date(now.getTime() - YIELD_DAYS * 86_400_000),
  });
  const interval = feedingInterval(bin.feedingIntervalDays, farm.feedingIntervalDays);
  const feeding = nextFeeding({ lastFeedingAt: facts.lastFeedingAt, intervalDays: interval.days, today, timeZone: farm.timezone });
  const estimate =
    side && facts.harvestSide
      ? harvestEstimate({
          today,
          timeZone: farm.timezone,
          lastFeedingAt: facts.harvestSide.lastFeedingAt,
          lastShiftInAt: facts.harvestSide.lastShiftInAt,
          moisture: facts.harvestSide.moisture,
        })
      : null;
  return {
    today,
    interval,
    feeding,
    harvestSide: side && estimate ? { zone: { id: side.id, kind: side.kind, name: side.name }, estimate } : null,
    planned: bin.plannedHarvestOn ? { on: bin.plannedHarvestOn, words: plannedHarvestWords(bin.plannedHarvestOn, estimate, today)! } : null,
    yields: {
      perHarvest: facts.harvests.map((h) => ({ on: localDate(h.at, farm.timezone), massKg: h.massKg })),
      perMonth: harvestsPerMonth(facts.harvests, farm.timezone),
    },
  };
}
export type BinCycle = Awaited<ReturnType<typeof readBinCycle>>;
