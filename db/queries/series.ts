import { and, asc, eq, gt, gte, isNull, lt, or, sql, type SQL } from "drizzle-orm";
import { db } from "@/db";
import { bins, farms, feedingItems, feedings, harvests, probes, shifts, users, waterings, zones, type Metric } from "@/db/schema";

// The reads behind a chart's series; lib/server/series chooses among them and shapes the answer.

export type SeriesLine = {
  probeId: number;
  code: string;
  label: string | null;
  /** Start of each point (raw: the reading's time) in Unix seconds, ascending. */
  t: number[];
  mean: number[];
  min: number[];
  max: number[];
};

export type ChartEventKind = "feeding" | "watering" | "shift" | "harvest";

/** A logbook entry drawn as a mark on a chart: what was done, when and where, with its amount. */
export type ChartEvent = {
  kind: ChartEventKind;
  id: string;
  at: Date;
  /** The zone it concerned (a shift's from-zone); null = the whole bin. */
  zoneId: string | null;
  /** A shift's to-zone. */
  toZoneId: string | null;
  /** A feeding's or a harvest's mass. */
  massKg: number | null;
  /** A watering's litres. */
  litres: number | null;
  /** A harvest's or a shift's volume, when measured. */
  volumeL: number | null;
  byName: string | null;
};

/** The range's level: raw readings (bucketed when too many), or hourly rollups merged into buckets. */
export type SeriesLevel = { source: "raw" | "rollup"; bucketSeconds: number | null };

export type SeriesAnswer = SeriesLevel & {
  metric: Metric;
  unit: string | null;
  displayUnit: string;
  from: string;
  to: string;
  series: SeriesLine[];
  /** A zone's series: the logbook's feedings, waterings, shifts and harvests in the range that
   * concern the zone. A probe's series has none (a probe may move between zones). */
  events?: ChartEvent[];
};

/** One line per zone of a bin: the zone's probes merged. */
export type BinSeriesLine = { zoneId: string; kind: string; name: string | null; t: number[]; mean: number[]; min: number[]; max: number[] };

export type BinSeriesAnswer = SeriesLevel & {
  metric: Metric;
  unit: string | null;
  displayUnit: string;
  from: string;
  to: string;
  species: string;
  zones: BinSeriesLine[];
  events: ChartEvent[];
};

export type SeriesProbe = { id: number; code: string; label: string | null };
export type SeriesRange = { metric: Metric; from: Date; to: Date };
/** One point of one line (a probe's id, or a zone's): a reading (mean = min = max) or a bucket of them. */
export type SeriesPoint = { key: string; t: Date; mean: number; min: number; max: number };
/** Lines by probe (a zone's chart) or by zone (a bin's chart). */
export type LineKey = "probe" | "zone";

const ref = { id: probes.id, code: probes.code, label: probes.label };

/** Every probe placed in the zone, archived ones only if they were still in use after `since`. */
export async function listZoneSeriesProbes(zoneId: string, since: Date): Promise<SeriesProbe[]> {
  return db()
    .select(ref)
    .from(probes)
    .where(and(eq(probes.zoneId, zoneId), or(isNull(probes.archivedAt), gt(probes.archivedAt, since))))
    .orderBy(asc(probes.code));
}

/** Every probe placed in one of the bin's zones, archived ones only if they were still in use after `since`. */
export async function listBinSeriesProbeIds(binId: string, since: Date): Promise<number[]> {
  const rows = await db()
    .select({ id: probes.id })
    .from(probes)
    .innerJoin(zones, eq(zones.id, probes.zoneId))
    .where(and(eq(zones.binId, binId), or(isNull(probes.archivedAt), gt(probes.archivedAt, since))));
  return rows.map((r) => r.id);
}

/** The bin a zone belongs to and its farm's time zone (buckets of a day are cut at its midnight). */
export async function getZoneSeriesPlace(zoneId: string): Promise<{ binId: string; timezone: string } | null> {
  const [r] = await db()
    .select({ binId: zones.binId, timezone: farms.timezone })
    .from(zones)
    .innerJoin(bins, eq(bins.id, zones.binId))
    .innerJoin(farms, eq(farms.id, bins.farmId))
    .where(eq(zones.id, zoneId));
  return r ?? null;
}

/** A bin's species, its farm's time zone and its zones (not archived) from the feeding side. */
export async function getBinSeriesPlace(binId: string) {
  const [bin] = await db()
    .select({ species: bins.species, timezone: farms.timezone })
    .from(bins)
    .innerJoin(farms, eq(farms.id, bins.farmId))
    .where(eq(bins.id, binId));
  if (!bin) return null;
  const list = await db()
    .select({ id: zones.id, kind: zones.kind, name: zones.name })
    .from(zones)
    .where(and(eq(zones.binId, binId), isNull(zones.archivedAt)))
    .orderBy(asc(zones.position));
  return { ...bin, zones: list };
}

export async function getSeriesProbe(probeId: number): Promise<SeriesProbe | null> {
  const [p] = await db().select(ref).from(probes).where(eq(probes.id, probeId));
  return p ?? null;
}

const inRange = (ids: number[], r: SeriesRange) =>
  sql`r.probe_id = any(${sql.param(ids)}::int[]) and r.metric = ${r.metric} and r.ts >= ${r.from.toISOString()} and r.ts < ${r.to.toISOString()}`;

// A zone's line merges its probes; the zone is where the probe is placed now.
const keyOf = (by: LineKey) => (by === "zone" ? sql`p.zone_id::text` : sql`r.probe_id::text`);

/** One line per probe in one statement and one read of the readings: each reading a point of its
 * own while no probe has more than `maxPoints` in the range, else buckets of `bucketS` seconds
 * (`bucketed` says which). Counting first and then reading took two round trips and two reads. */
export async function listProbeLinePoints(
  ids: number[],
  r: SeriesRange,
  maxPoints: number,
  bucketS: number,
): Promise<{ bucketed: boolean; rows: SeriesPoint[] }> {
  const got = await db().execute<SeriesPoint & { bucketed: boolean }>(probeLinePointsSql(ids, r, maxPoints, bucketS));
  return { bucketed: got.rows[0]?.bucketed ?? false, rows: got.rows };
}

/** The statement behind listProbeLinePoints (tests EXPLAIN it for the partitions it reads). */
export const probeLinePointsSql = (ids: number[], r: SeriesRange, maxPoints: number, bucketS: number) => sql`
    with pts as materialized (
      select r.probe_id, r.ts, r.value from readings r where ${inRange(ids, r)}
    ), many as (
      select coalesce(max(n), 0) > ${maxPoints} as b from (select count(*) as n from pts group by probe_id) x
    )
    select * from (
      select pts.probe_id::text as key, pts.ts as t, pts.value as mean, pts.value as min, pts.value as max, false as bucketed
      from pts, many where not many.b
      union all
      select pts.probe_id::text, date_bin(make_interval(secs => ${bucketS}), pts.ts, ${ORIGIN}), avg(pts.value), min(pts.value), max(pts.value), true
      from pts, many where many.b
      group by 1, 2
    ) y order by 1, 2`;

// date_bin (PostgreSQL 14+) has no Drizzle word; buckets align to a fixed origin so a chart that
// slides its window keeps the same bucket edges.
const ORIGIN = sql`timestamptz '2000-01-01 00:00:00+00'`;

/** The statement behind listBucketedReadingPoints (tests EXPLAIN it: it must touch only the
 * month partitions of readings that the range overlaps). */
export const bucketedReadingSql = (ids: number[], r: SeriesRange, bucketS: number, by: LineKey = "probe") => sql`
    select ${keyOf(by)} as key, date_bin(make_interval(secs => ${bucketS}), r.ts, ${ORIGIN}) as t,
           avg(r.value) as mean, min(r.value) as min, max(r.value) as max
    from readings r join probes p on p.id = r.probe_id
    where ${inRange(ids, r)}
    group by 1, 2 order by 1, 2`;

/** The readings in the range merged into buckets of `bucketS` seconds. */
export async function listBucketedReadingPoints(ids: number[], r: SeriesRange, bucketS: number, by: LineKey = "probe"): Promise<SeriesPoint[]> {
  const got = await db().execute<SeriesPoint>(bucketedReadingSql(ids, r, bucketS, by));
  return got.rows;
}

/** The hourly rollups that overlap the range merged into buckets of `bucketS` seconds (a whole
 * number of hours). With a `timezone`, buckets are cut on that zone's wall clock (6-hour buckets
 * at 00, 06, 12 and 18, days at midnight, a day of a clock change 23 or 25 hours long); a rollup
 * hour goes to the bucket its start falls in, so in a zone off UTC by half an hour a bucket edge
 * is half an hour out. */
export async function listRollupPoints(ids: number[], r: SeriesRange, bucketS: number, opts: { by?: LineKey; timezone?: string } = {}): Promise<SeriesPoint[]> {
  const tz = opts.timezone ?? "UTC";
  // The mean of merged hours weighs each hour by its reading count.
  const got = await db().execute<SeriesPoint>(sql`
    select ${keyOf(opts.by ?? "probe")} as key,
           date_bin(make_interval(secs => ${bucketS}), r.hour at time zone ${tz}, timestamp '2000-01-01') at time zone ${tz} as t,
           sum(r.sum) / sum(r.count) as mean, min(r.min) as min, max(r.max) as max
    from reading_rollups r join probes p on p.id = r.probe_id
    where r.probe_id = any(${sql.param(ids)}::int[]) and r.metric = ${r.metric}
      and r.hour >= date_trunc('hour', ${r.from.toISOString()}::timestamptz, 'UTC') and r.hour < ${r.to.toISOString()}
    group by 1, 2 order by 1, 2`);
  return got.rows;
}

/** The statement behind listDailyPoints. Days the deferred refresh has done for a probe in this
 * time zone (reading_daily_state; db/queries/daily-rollups.ts) come from reading_daily_rollups, one
 * row a day; the part day at the start of the range and the days since the refresh (today, at
 * least) come from the hourly rollups. Both are merged into the farm's days exactly as
 * listRollupPoints merges hours, so the answer is the same, from about 1/24 of the rows. */
export const dailyPointsSql = (ids: number[], r: SeriesRange, timezone: string, by: LineKey = "probe") => sql`
    with b as (
      select date_trunc('hour', f, 'UTC') as h0, t as t1,
             case when date_trunc('day', f, ${timezone}) = f then f
                  else ((date_trunc('day', f, ${timezone}) at time zone ${timezone}) + interval '1 day') at time zone ${timezone} end as d0,
             date_trunc('day', t, ${timezone}) as d1
      from (select ${r.from.toISOString()}::timestamptz as f, ${r.to.toISOString()}::timestamptz as t) x
    ), cut as (
      select p.id as probe_id, b.d0, greatest(b.d0, least(coalesce(s.done_through, b.d0), b.d1)) as c
      from unnest(${sql.param(ids)}::int[]) as p(id) cross join b
      left join reading_daily_state s on s.probe_id = p.id and s.timezone = ${timezone}
    ), pts as (
      select d.probe_id, d.day as at, d.min, d.max, d.sum, d.count
      from cut join reading_daily_rollups d on d.probe_id = cut.probe_id and d.metric = ${r.metric} and d.day >= cut.d0 and d.day < cut.c
      union all
      select h.probe_id, h.hour, h.min, h.max, h.sum, h.count
      from cut cross join b join reading_rollups h on h.probe_id = cut.probe_id and h.metric = ${r.metric} and h.hour >= b.h0 and h.hour < least(b.d0, b.t1)
      union all
      select h.probe_id, h.hour, h.min, h.max, h.sum, h.count
      from cut cross join b join reading_rollups h on h.probe_id = cut.probe_id and h.metric = ${r.metric} and h.hour >= greatest(cut.c, b.h0) and h.hour < b.t1
    )
    select ${by === "zone" ? sql`p.zone_id::text` : sql`pts.probe_id::text`} as key,
           date_trunc('day', pts.at, ${timezone}) as t,
           sum(pts.sum) / sum(pts.count) as mean, min(pts.min) as min, max(pts.max) as max
    from pts join probes p on p.id = pts.probe_id
    group by 1, 2 order by 1, 2`;

/** The range in days cut at the farm's midnight (`timezone`), from daily rollups where the deferred
 * refresh has made them and hourly rollups elsewhere: the same points as listRollupPoints with a
 * day's bucket. */
export async function listDailyPoints(ids: number[], r: SeriesRange, timezone: string, by: LineKey = "probe"): Promise<SeriesPoint[]> {
  const got = await db().execute<SeriesPoint>(dailyPointsSql(ids, r, timezone, by));
  return got.rows;
}

/** Which logbook entries of a bin a chart marks: all of them, or those of one zone and the whole-bin ones. */
export type EventScope = { binId: string; zoneId?: string; from: Date; to: Date };

// A year of a busy bin stays well under this; the newest are kept if ever it is reached.
const EVENTS_PER_KIND = 1000;

/** The bin's feedings, waterings, shifts and harvests in the range, oldest first. A zone's chart
 * gets its own entries, the whole-bin ones and the shifts that moved material into it. */
export async function listChartEvents(s: EventScope): Promise<ChartEvent[]> {
  const d = db();
  const where = (t: typeof feedings | typeof waterings | typeof harvests | typeof shifts, extra?: SQL) =>
    and(eq(t.binId, s.binId), gte(t.at, s.from), lt(t.at, s.to), s.zoneId ? or(eq(t.zoneId, s.zoneId), isNull(t.zoneId), extra) : undefined);
  const base = <T extends typeof feedings | typeof waterings | typeof harvests | typeof shifts>(t: T) => ({
    id: t.id,
    at: t.at,
    zoneId: t.zoneId,
    byName: users.name,
  });
  const [fed, watered, harvested, shifted] = await Promise.all([
    d
      .select({
        ...base(feedings),
        massKg: sql<
          number | null
        >`coalesce(${feedings.totalKg}, (select sum(${feedingItems.massKg}) from ${feedingItems} where ${feedingItems.feedingId} = ${feedings.id}))`,
      })
      .from(feedings)
      .leftJoin(users, eq(users.id, feedings.byUserId))
      .where(where(feedings))
      .orderBy(sql`${feedings.at} desc`)
      .limit(EVENTS_PER_KIND),
    d
      .select({ ...base(waterings), litres: waterings.litres })
      .from(waterings)
      .leftJoin(users, eq(users.id, waterings.byUserId))
      .where(where(waterings))
      .orderBy(sql`${waterings.at} desc`)
      .limit(EVENTS_PER_KIND),
    d
      .select({ ...base(harvests), massKg: harvests.massKg, volumeL: harvests.volumeL })
      .from(harvests)
      .leftJoin(users, eq(users.id, harvests.byUserId))
      .where(where(harvests))
      .orderBy(sql`${harvests.at} desc`)
      .limit(EVENTS_PER_KIND),
    d
      .select({ ...base(shifts), toZoneId: shifts.toZoneId, volumeL: shifts.volumeL })
      .from(shifts)
      .leftJoin(users, eq(users.id, shifts.byUserId))
      .where(where(shifts, s.zoneId ? eq(shifts.toZoneId, s.zoneId) : undefined))
      .orderBy(sql`${shifts.at} desc`)
      .limit(EVENTS_PER_KIND),
  ]);
  const none = { toZoneId: null, massKg: null, litres: null, volumeL: null };
  const all: ChartEvent[] = [
    ...fed.map((e) => ({ ...none, ...e, kind: "feeding" as const, massKg: e.massKg == null ? null : Number(e.massKg) })),
    ...watered.map((e) => ({ ...none, ...e, kind: "watering" as const })),
    ...harvested.map((e) => ({ ...none, ...e, kind: "harvest" as const })),
    ...shifted.map((e) => ({ ...none, ...e, kind: "shift" as const })),
  ];
  return all.sort((a, b) => a.at.getTime() - b.at.getTime());
}
