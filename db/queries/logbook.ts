import { and, asc, desc, eq, gte, lte, sql } from "drizzle-orm";
import { db } from "@/db";
import type { LogKind } from "@/lib/domain/vocabulary";
import { feedings, harvests, logNotes, ovenDrySamples, probes, readings, shifts, users, waterings as wateringsTable, zones } from "@/db/schema";

const tables = { feeding: feedings, watering: wateringsTable, shift: shifts, harvest: harvests, note: logNotes, sample: ovenDrySamples } as const;

type Common = { farmId: string; binId: string; zoneId: string | null; at: Date; byUserId: string; notes: string | null };

type Stored<R> = { row: R; created: boolean };
type LogTable = typeof wateringsTable | typeof harvests | typeof logNotes | typeof ovenDrySamples;

/** A log entry insert runs `on conflict (farm_id, client_key) do nothing`: when the farm already has
 * an entry under the phone's key, that entry is read back and returned instead of a second one. */
export async function storedOnce<R>(inserted: R[], existing: () => Promise<R[]>): Promise<Stored<R>> {
  if (inserted[0]) return { row: inserted[0], created: true };
  const [row] = await existing();
  return { row: row!, created: false };
}

const byKey = (t: LogTable, v: { farmId: string; clientKey?: string | null }) => and(eq(t.farmId, v.farmId), eq(t.clientKey, v.clientKey ?? ""));

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
  moistureWbPct?: number;
  rawReading?: number | null;
  mixMoisturePct?: number | null;
  mixCn?: number | null;
};

// Every kind of a bin's logbook, merged newest first. Each kind is read newest first with the same
// limit, so the merged head is exact; the union is then cut to the limit.
export async function listLogbook(binId: string, opts: { limit?: number } = {}): Promise<LogbookEntry[]> {
  const limit = opts.limit ?? 100;
  const base = (t: typeof feedings | typeof wateringsTable | typeof harvests | typeof logNotes | typeof ovenDrySamples) => ({
    id: t.id,
    at: t.at,
    zoneId: t.zoneId,
    byUserId: t.byUserId,
    createdAt: t.createdAt,
    notes: t.notes,
    byName: users.name,
  });
  const d = db();
  const [f, w, h, n, s] = await Promise.all([
    d
      .select({ ...base(feedings), totalKg: feedings.totalKg, mixMoisturePct: feedings.mixMoisturePct, mixCn: feedings.mixCn })
      .from(feedings)
      .leftJoin(users, eq(users.id, feedings.byUserId))
      .where(eq(feedings.binId, binId))
      .orderBy(desc(feedings.at))
      .limit(limit),
    d
      .select({ ...base(wateringsTable), litres: wateringsTable.litres })
      .from(wateringsTable)
      .leftJoin(users, eq(users.id, wateringsTable.byUserId))
      .where(eq(wateringsTable.binId, binId))
      .orderBy(desc(wateringsTable.at))
      .limit(limit),
    d
      .select({ ...base(harvests), massKg: harvests.massKg })
      .from(harvests)
      .leftJoin(users, eq(users.id, harvests.byUserId))
      .where(eq(harvests.binId, binId))
      .orderBy(desc(harvests.at))
      .limit(limit),
    d
      .select({ ...base(logNotes), text: logNotes.text })
      .from(logNotes)
      .leftJoin(users, eq(users.id, logNotes.byUserId))
      .where(eq(logNotes.binId, binId))
      .orderBy(desc(logNotes.at))
      .limit(limit),
    d
      .select({ ...base(ovenDrySamples), moistureWbPct: ovenDrySamples.moistureWbPct, rawReading: ovenDrySamples.rawReading })
      .from(ovenDrySamples)
      .leftJoin(users, eq(users.id, ovenDrySamples.byUserId))
      .where(eq(ovenDrySamples.binId, binId))
      .orderBy(desc(ovenDrySamples.at))
      .limit(limit),
  ]);
  const all: LogbookEntry[] = [
    ...f.map(({ totalKg, ...r }) => ({ ...r, kind: "feeding" as const, massKg: totalKg ?? undefined })),
    ...w.map((r) => ({ ...r, kind: "watering" as const })),
    ...h.map((r) => ({ ...r, kind: "harvest" as const })),
    ...n.map((r) => ({ ...r, kind: "note" as const })),
    ...s.map((r) => ({ ...r, kind: "sample" as const })),
  ];
  all.sort((a, b) => b.at.getTime() - a.at.getTime() || b.createdAt.getTime() - a.createdAt.getTime());
  return all.slice(0, limit);
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
