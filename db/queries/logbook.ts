import { and, asc, desc, eq, gte, inArray, lt, lte, or, sql } from "drizzle-orm";
import { db } from "@/db";
import type { LogKind } from "@/lib/domain/vocabulary";
import {
  bins,
  feedingItems,
  feedings,
  harvests,
  logNotes,
  ovenDrySamples,
  probes,
  readings,
  shifts,
  users,
  waterings as wateringsTable,
  zones,
} from "@/db/schema";

const tables = { feeding: feedings, watering: wateringsTable, shift: shifts, harvest: harvests, note: logNotes, sample: ovenDrySamples } as const;

type Common = { farmId: string; binId: string; zoneId: string | null; at: Date; byUserId: string; notes: string | null };

type Stored<R> = { row: R; created: boolean };
type InsertTable = typeof wateringsTable | typeof harvests | typeof logNotes | typeof ovenDrySamples;

/** A log entry insert runs `on conflict (farm_id, client_key) do nothing`: when the farm already has
 * an entry under the phone's key, that entry is read back and returned instead of a second one. */
export async function storedOnce<R>(inserted: R[], existing: () => Promise<R[]>): Promise<Stored<R>> {
  if (inserted[0]) return { row: inserted[0], created: true };
  const [row] = await existing();
  return { row: row!, created: false };
}

const byKey = (t: InsertTable, v: { farmId: string; clientKey?: string | null }) => and(eq(t.farmId, v.farmId), eq(t.clientKey, v.clientKey ?? ""));

type Keyed = { clientKey?: string | null };

export async function insertWatering(w: Common & Keyed & { litres: number }) {
  const t = wateringsTable;
  const inserted = await db()
    .insert(t)
    .values(w)
    .onConflictDoNothing({ target: [t.farmId, t.clientKey] })
    .returning();
  return storedOnce(inserted, () => db().select().from(t).where(byKey(t, w)));
}

export async function insertHarvest(h: Common & Keyed & { massKg: number }) {
  const t = harvests;
  const inserted = await db()
    .insert(t)
    .values(h)
    .onConflictDoNothing({ target: [t.farmId, t.clientKey] })
    .returning();
  return storedOnce(inserted, () => db().select().from(t).where(byKey(t, h)));
}

export async function insertNote(n: Common & Keyed & { text: string }) {
  const t = logNotes;
  const inserted = await db()
    .insert(t)
    .values(n)
    .onConflictDoNothing({ target: [t.farmId, t.clientKey] })
    .returning();
  return storedOnce(inserted, () => db().select().from(t).where(byKey(t, n)));
}

type ListOpts = { limit?: number };

export async function listWaterings(binId: string, opts: ListOpts = {}) {
  return db()
    .select({ entry: wateringsTable, byName: users.name })
    .from(wateringsTable)
    .leftJoin(users, eq(users.id, wateringsTable.byUserId))
    .where(eq(wateringsTable.binId, binId))
    .orderBy(desc(wateringsTable.at))
    .limit(opts.limit ?? 50)
    .then((rows) => rows.map((r) => ({ ...r.entry, byName: r.byName })));
}

export async function listHarvests(binId: string, opts: ListOpts = {}) {
  return db()
    .select({ entry: harvests, byName: users.name })
    .from(harvests)
    .leftJoin(users, eq(users.id, harvests.byUserId))
    .where(eq(harvests.binId, binId))
    .orderBy(desc(harvests.at))
    .limit(opts.limit ?? 50)
    .then((rows) => rows.map((r) => ({ ...r.entry, byName: r.byName })));
}

export async function listNotes(binId: string, opts: ListOpts = {}) {
  return db()
    .select({ entry: logNotes, byName: users.name })
    .from(logNotes)
    .leftJoin(users, eq(users.id, logNotes.byUserId))
    .where(eq(logNotes.binId, binId))
    .orderBy(desc(logNotes.at))
    .limit(opts.limit ?? 50)
    .then((rows) => rows.map((r) => ({ ...r.entry, byName: r.byName })));
}

export type LogbookEntry = {
  kind: LogKind;
  id: string;
  at: Date;
  /** `at` to the microsecond as ISO text (a Date keeps milliseconds): the paging cursor's time. */
  atExact: string;
  binId: string;
  binName: string;
  zoneId: string | null;
  byUserId: string | null;
  byName: string | null;
  createdAt: Date;
  notes: string | null;
  /** What the entry says in one line of numbers (litres, kg, moisture…), stored units. */
  litres?: number;
  massKg?: number;
  text?: string;
  volumeL?: number | null;
  toZoneId?: string | null;
  moistureWbPct?: number;
  rawReading?: number | null;
  mixMoisturePct?: number | null;
  mixCn?: number | null;
  /** A feeding's items, so its mix check can be shown (and recomputed) beside it. */
  items?: FeedingItemRow[];
};
type FeedingItemRow = typeof feedingItems.$inferSelect;

/** What a logbook list may be narrowed by; every filter is optional, `limit` is not. */
export type LogbookFilter = {
  farmId?: string;
  binId?: string;
  /** The entry's zone (or, for a shift, either of its zones). */
  zoneId?: string;
  byUserId?: string;
  kinds?: readonly LogKind[];
  /** Inclusive start and exclusive end instants. */
  from?: Date;
  to?: Date;
  /** Only entries older than this one in (at, id) order: the next older page (`at` as ISO text, microseconds kept). */
  before?: { at: string; id: string };
  limit: number;
};

type LogTable = (typeof tables)[LogKind];
// Every log table is made of the same logColumns() (db/schema.ts), so one of them stands for the
// shared columns' types; the columns used are each table's own.
type Shared = typeof wateringsTable;

function narrowed(table: LogTable, f: LogbookFilter) {
  const t = table as unknown as Shared;
  const zone = f.zoneId ? (table === shifts ? or(eq(shifts.zoneId, f.zoneId), eq(shifts.toZoneId, f.zoneId)) : eq(t.zoneId, f.zoneId)) : undefined;
  return and(
    f.farmId ? eq(t.farmId, f.farmId) : undefined,
    f.binId ? eq(t.binId, f.binId) : undefined,
    zone,
    f.byUserId ? eq(t.byUserId, f.byUserId) : undefined,
    f.from ? gte(t.at, f.from) : undefined,
    f.to ? lt(t.at, f.to) : undefined,
    // Row comparison: a keyset cursor over (at, id), both descending, so entries at one instant are each shown once.
    f.before ? sql`(${t.at}, ${t.id}) < (${f.before.at}::timestamptz, ${f.before.id}::uuid)` : undefined,
  );
}

const OWN = {
  feeding: { totalKg: feedings.totalKg, mixMoisturePct: feedings.mixMoisturePct, mixCn: feedings.mixCn },
  watering: { litres: wateringsTable.litres },
  shift: { volumeL: shifts.volumeL, toZoneId: shifts.toZoneId },
  harvest: { massKg: harvests.massKg },
  note: { text: logNotes.text },
  sample: { moistureWbPct: ovenDrySamples.moistureWbPct, rawReading: ovenDrySamples.rawReading },
} as const;

function readKind(kind: LogKind, f: LogbookFilter) {
  const table = tables[kind];
  const t = table as unknown as Shared;
  return db()
    .select({
      id: t.id,
      at: t.at,
      atExact: sql<string>`to_char(${t.at} at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"')`,
      binId: t.binId,
      binName: bins.name,
      zoneId: t.zoneId,
      byUserId: t.byUserId,
      createdAt: t.createdAt,
      notes: t.notes,
      byName: users.name,
      ...OWN[kind],
    })
    .from(t)
    .innerJoin(bins, eq(bins.id, t.binId))
    .leftJoin(users, eq(users.id, t.byUserId))
    .where(narrowed(table, f))
    .orderBy(desc(t.at), desc(t.id))
    .limit(f.limit);
}

// Fixed-width UTC text compares as the instants do; ids as PostgreSQL orders uuids (lowercase hex).
const desc2 = (a: string, b: string) => (a < b ? 1 : a > b ? -1 : 0);
const newestFirst = (a: LogbookEntry, b: LogbookEntry) => desc2(a.atExact, b.atExact) || desc2(a.id, b.id);

// Every kind asked for, merged newest first. Each kind is read newest first with the same limit,
// so the merged head is exact; the union is then cut to the limit. Feedings come with their items.
export async function listLogEntries(f: LogbookFilter): Promise<LogbookEntry[]> {
  const kinds = f.kinds ?? (Object.keys(tables) as LogKind[]);
  const read = await Promise.all(kinds.map(async (kind) => (await readKind(kind, f)).map((r) => ({ ...r, kind }) as Record<string, unknown>)));
  const all = read.flat().map(({ totalKg, ...r }) => ({ ...r, ...(totalKg !== undefined ? { massKg: totalKg ?? undefined } : {}) }) as unknown as LogbookEntry);
  all.sort(newestFirst);
  const page = all.slice(0, f.limit);
  const fed = page.filter((e) => e.kind === "feeding").map((e) => e.id);
  const items = fed.length ? await db().select().from(feedingItems).where(inArray(feedingItems.feedingId, fed)) : [];
  for (const e of page) if (e.kind === "feeding") e.items = items.filter((i) => i.feedingId === e.id);
  return page;
}

/** A bin's whole logbook, every kind merged newest first. */
export async function listLogbook(binId: string, opts: { limit?: number } = {}): Promise<LogbookEntry[]> {
  return listLogEntries({ binId, limit: opts.limit ?? 100 });
}

/** The bin, author and creation time of one logbook entry, or null. */
export async function getLogEntry(kind: LogKind, id: string) {
  if (!/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id)) return null;
  const t = tables[kind];
  const [row] = await db().select({ id: t.id, binId: t.binId, byUserId: t.byUserId, createdAt: t.createdAt }).from(t).where(eq(t.id, id));
  return row ?? null;
}

export async function deleteLogEntry(kind: LogKind, id: string): Promise<boolean> {
  const t = tables[kind];
  const gone = await db().delete(t).where(eq(t.id, id)).returning({ id: t.id });
  return gone.length > 0;
}

// ---- oven-dry samples and calibration ----

export async function getProbePlace(probeId: number) {
  const [row] = await db()
    .select({
      id: probes.id,
      farmId: probes.farmId,
      code: probes.code,
      label: probes.label,
      zoneId: probes.zoneId,
      binId: zones.binId,
      calibration: probes.calibration,
    })
    .from(probes)
    .leftJoin(zones, eq(zones.id, probes.zoneId))
    .where(eq(probes.id, probeId));
  return row ?? null;
}

/** The probe's `moisture-raw` reading nearest to `at`, within ±windowMs, or null. */
export async function nearestRawReading(probeId: number, at: Date, windowMs = 10 * 60_000): Promise<{ ts: Date; value: number } | null> {
  const from = new Date(at.getTime() - windowMs);
  const to = new Date(at.getTime() + windowMs);
  const [row] = await db()
    .select({ ts: readings.ts, value: readings.value })
    .from(readings)
    .where(and(eq(readings.probeId, probeId), eq(readings.metric, "moisture-raw"), gte(readings.ts, from), lte(readings.ts, to)))
    // Distance from `at` in seconds; the primary key range keeps this to the window's rows.
    .orderBy(sql`abs(extract(epoch from ${readings.ts} - ${at.toISOString()}::timestamptz))`, asc(readings.ts))
    .limit(1);
  return row ?? null;
}

export async function insertSample(
  s: Common &
    Keyed & {
      probeId: number;
      wetMassG: number;
      dryMassG: number;
      tareG: number;
      ovenTempC: number | null;
      rawReading: number | null;
      moistureWbPct: number;
    },
) {
  const t = ovenDrySamples;
  const inserted = await db()
    .insert(t)
    .values(s)
    .onConflictDoNothing({ target: [t.farmId, t.clientKey] })
    .returning();
  return storedOnce(inserted, () => db().select().from(t).where(byKey(t, s)));
}

export async function listProbeSamples(probeId: number) {
  return db()
    .select({ entry: ovenDrySamples, byName: users.name })
    .from(ovenDrySamples)
    .leftJoin(users, eq(users.id, ovenDrySamples.byUserId))
    .where(eq(ovenDrySamples.probeId, probeId))
    .orderBy(desc(ovenDrySamples.at))
    .then((rows) => rows.map((r) => ({ ...r.entry, byName: r.byName })));
}

export type StoredCalibration = { slope: number; intercept: number; r2: number; fittedAt: string; points: number };

export async function setProbeCalibration(probeId: number, cal: StoredCalibration | null) {
  await db().update(probes).set({ calibration: cal }).where(eq(probes.id, probeId));
}

/** Every zone of a farm's bins, archived ones too (old entries still name them), in bin order. */
export async function listFarmZones(farmId: string) {
  return db()
    .select({
      id: zones.id,
      binId: zones.binId,
      kind: zones.kind,
      name: zones.name,
      position: zones.position,
      archived: sql<boolean>`${zones.archivedAt} is not null`,
    })
    .from(zones)
    .innerJoin(bins, eq(bins.id, zones.binId))
    .where(eq(bins.farmId, farmId))
    .orderBy(asc(bins.name), asc(zones.position));
}
