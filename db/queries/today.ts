import { sql } from "drizzle-orm";
import { db } from "@/db";
import { feedingInterval, localDate, nextFeeding } from "@/lib/domain/bin-cycle";
import { timeZoneOrUtc } from "@/lib/domain/validation/fields";
import { listAlerts } from "./alerts";
import { lastFeedingsOfFarm, listBins } from "./bins";
import { getFarm } from "./farms";

export type ZoneLatest = { zoneId: string; metric: string; ts: string; value: number };
export type SparkPoint = { zoneId: string; metric: string; t: string; v: number };

// Latest temperature, moisture and ammonia of every zone of a farm: one lateral lookup per probe
// and metric through the readings key, newest probe reading wins when a zone has several.
async function latestByZone(farmId: string): Promise<ZoneLatest[]> {
  const r = await db().execute(sql`
    select distinct on (p.zone_id, m.metric) p.zone_id as "zoneId", m.metric::text as metric, r.ts, r.value
    from probes p
    cross join unnest(array['temperature','moisture','ammonia']::metric[]) as m(metric)
    join lateral (
      select ts, value from readings
      where probe_id = p.id and metric = m.metric
      order by ts desc limit 1
    ) r on true
    where p.farm_id = ${farmId} and p.zone_id is not null and p.archived_at is null
    order by p.zone_id, m.metric, r.ts desc`);
  return (r.rows as { zoneId: string; metric: string; ts: Date; value: number }[]).map((x) => ({
    ...x,
    ts: new Date(x.ts).toISOString(),
  }));
}

// 24 h of temperature and moisture per zone in 15-minute means (date_bin has no Drizzle word):
// 96 points a series is plenty for a phone-sized chart. The same probes as latestByZone (archived
// ones left out) and the caller's clock, so the chart and the latest value speak of one zone.
async function sparklines(farmId: string, since: Date): Promise<SparkPoint[]> {
  const r = await db().execute(sql`
    select p.zone_id as "zoneId", r.metric::text as metric,
           date_bin('15 minutes', r.ts, timestamptz '2000-01-01') as t, avg(r.value)::float8 as v
    from readings r join probes p on p.id = r.probe_id
    where p.farm_id = ${farmId} and p.zone_id is not null and p.archived_at is null
      and r.metric in ('temperature', 'moisture')
      and r.ts > ${since.toISOString()}::timestamptz
    group by 1, 2, 3 order by 1, 2, 3`);
  return (r.rows as { zoneId: string; metric: string; t: Date; v: number }[]).map((x) => ({
    ...x,
    t: new Date(x.t).toISOString(),
  }));
}

type SparkSeries = (readonly [string, number])[];

const BUCKET_MS = 15 * 60_000;

/** A zone's 24 h series ending at its latest value: the latest reading stands in for the mean of
 * its own quarter hour, so the line ends at the value shown above it, and a first reading is one
 * point (the board says so) rather than an empty chart. */
export function sparkEndingAt(buckets: SparkSeries, latest: { ts: string; value: number } | undefined, since: Date): SparkSeries {
  if (!latest || Date.parse(latest.ts) <= since.getTime()) return buckets;
  const before = buckets.filter(([t]) => Date.parse(t) + BUCKET_MS <= Date.parse(latest.ts));
  return [...before, [latest.ts, latest.value] as const];
}

export async function getToday(farmId: string, hours = 24, now = new Date()) {
  const since = new Date(now.getTime() - hours * 3_600_000);
  const [binList, latest, spark, open, farm, lastFed] = await Promise.all([
    listBins(farmId),
    latestByZone(farmId),
    sparklines(farmId, since),
    listAlerts(farmId, { open: true }),
    getFarm(farmId),
    lastFeedingsOfFarm(farmId),
  ]);
  const timeZone = timeZoneOrUtc(farm?.timezone ?? "UTC");
  const today = localDate(now, timeZone);
  // Each bin's next feeding, on its own interval or the farm's (lib/domain/bin-cycle.ts).
  const feedingOf = (b: { id: string; feedingIntervalDays: number | null }) =>
    nextFeeding({
      lastFeedingAt: lastFed.get(b.id) ?? null,
      intervalDays: feedingInterval(b.feedingIntervalDays, farm?.feedingIntervalDays).days,
      today,
      timeZone,
    });
  const series = (zoneId: string, metric: string) => spark.filter((s) => s.zoneId === zoneId && s.metric === metric).map((s) => [s.t, s.v] as const);
  return {
    bins: binList.map((b) => ({
      ...b,
      feeding: feedingOf(b),
      zones: b.zones.map((z) => {
        const mine: Record<string, { ts: string; value: number }> = Object.fromEntries(
          latest.filter((l) => l.zoneId === z.id).map((l) => [l.metric, { ts: l.ts, value: l.value }]),
        );
        return {
          ...z,
          latest: mine,
          spark: {
            temperature: sparkEndingAt(series(z.id, "temperature"), mine.temperature, since),
            moisture: sparkEndingAt(series(z.id, "moisture"), mine.moisture, since),
          },
        };
      }),
    })),
    alerts: open.map((a) => ({ ...a.alert, binName: a.binName, zoneKind: a.zoneKind, claimedByName: a.claimedByName })),
  };
}
export type Today = Awaited<ReturnType<typeof getToday>>;
