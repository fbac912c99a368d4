import { and, eq, getTableColumns, sql, type SQL } from "drizzle-orm";
import { db } from "@/db";
import { probes, type Probe } from "@/db/schema";
import { hasChanges } from "./patch";
import type { Executor } from "./readings";

export async function getProbeByCode(code: string, ex: Executor = db()): Promise<Probe | null> {
  const [p] = await ex.select().from(probes).where(eq(probes.code, code));
  return p ?? null;
}

export type ProbeStatusUpdate = {
  probeId: number;
  seenAt?: Date | null;
  batteryV?: number | null;
  signalDbm?: number | null;
  firmware?: string | null;
  online?: boolean | null;
};

// One statement; a probe's updates merge in order (last value wins), last_seen_at never goes back.
export async function updateProbeStatus(updates: readonly ProbeStatusUpdate[], ex: Executor = db()): Promise<void> {
  const update = probeStatusUpdateSql(updates);
  if (update) await ex.execute(update);
}

/** The UPDATE of updateProbeStatus, or null when there is nothing to update (the ingest writer runs
 * it inside its one statement per batch, db/queries/readings.ts storeBatch). */
export function probeStatusUpdateSql(updates: readonly ProbeStatusUpdate[]): SQL | null {
  const merged = new Map<number, ProbeStatusUpdate>();
  for (const u of updates) {
    const m = merged.get(u.probeId) ?? { probeId: u.probeId };
    for (const k of ["batteryV", "signalDbm", "firmware", "online"] as const) {
      if (u[k] != null) Object.assign(m, { [k]: u[k] });
    }
    if (u.seenAt && (!m.seenAt || u.seenAt > m.seenAt)) m.seenAt = u.seenAt;
    merged.set(u.probeId, m);
  }
  const rows = [...merged.values()].sort((a, b) => a.probeId - b.probeId);
  if (rows.length === 0) return null;
  const col = <T>(f: (u: ProbeStatusUpdate) => T | null | undefined) => sql.param(rows.map((u) => f(u) ?? null));
  return sql`
    update probes p set
      last_seen_at = greatest(p.last_seen_at, s.seen),
      battery_v = coalesce(s.battery, p.battery_v),
      signal_dbm = coalesce(s.signal, p.signal_dbm),
      firmware = coalesce(s.firmware, p.firmware),
      online = coalesce(s.online, p.online)
    from unnest(
      ${col((u) => u.probeId)}::int[],
      ${col((u) => u.seenAt?.toISOString())}::timestamptz[],
      ${col((u) => u.batteryV)}::real[],
      ${col((u) => u.signalDbm)}::real[],
      ${col((u) => u.firmware?.replace(/\u0000/g, ""))}::text[],
      ${col((u) => u.online)}::boolean[]
    ) as s(id, seen, battery, signal, firmware, online)
    where p.id = s.id`;
}

export async function setProbeOnline(code: string, online: boolean, ex: Executor = db()): Promise<void> {
  await ex.update(probes).set({ online }).where(eq(probes.code, code));
}

// Probe management (owners): what these return never holds the token hash.
export type ProbeRow = Omit<Probe, "tokenHash">;
const { tokenHash: _hash, ...shown } = getTableColumns(probes);

/** A probe as the probes list shows it (raw SQL, so typed here). */
export type ProbeStatusRow = {
  id: number;
  code: string;
  label: string | null;
  zoneId: string | null;
  zoneKind: string | null;
  zonePosition: number | null;
  binId: string | null;
  binName: string | null;
  binSpecies: string | null;
  metrics: string[];
  reportIntervalS: number;
  /** The last time anything was heard from the probe (any message, or its connection opening). */
  lastSeenAt: Date | null;
  /** The time of its latest stored reading, whichever the metric. */
  lastReadingAt: Date | null;
  /** Whether it holds an MQTT connection now (probes.online). */
  connected: boolean;
  batteryV: number | null;
  signalDbm: number | null;
  firmware: string | null;
  calibration: unknown;
  archivedAt: Date | null;
};

export async function listFarmProbesWithStatus(farmId: string) {
  const r = await db().execute<ProbeStatusRow>(sql`
    select p.id, p.code, p.label, p.zone_id as "zoneId", z.kind as "zoneKind", z.position as "zonePosition",
           b.id as "binId", b.name as "binName", b.species as "binSpecies", p.metrics, p.report_interval_s as "reportIntervalS",
           p.last_seen_at as "lastSeenAt", last.ts as "lastReadingAt", p.online as "connected",
           p.battery_v as "batteryV", p.signal_dbm as "signalDbm", p.firmware, p.calibration, p.archived_at as "archivedAt"
    from probes p
    left join zones z on z.id = p.zone_id
    left join bins b on b.id = z.bin_id
    -- The latest reading per metric through the readings key (probe, metric, ts), one short index
    -- walk each, rather than a scan of the probe's whole series.
    left join lateral (
      select max(r.ts) as ts
      from unnest(enum_range(null::metric)) m(metric)
      cross join lateral (
        select ts from readings where probe_id = p.id and metric = m.metric order by ts desc limit 1
      ) r
    ) last on true
    where p.farm_id = ${farmId}
    order by p.archived_at nulls first, b.name nulls last, z.position, p.code`);
  // Raw SQL hands timestamps over as text: made Dates here, as the type says.
  const at = (v: Date | string | null) => (v === null ? null : new Date(v));
  return r.rows.map((row) => ({ ...row, lastSeenAt: at(row.lastSeenAt), lastReadingAt: at(row.lastReadingAt), archivedAt: at(row.archivedAt) }));
}

/** The new probe, or null when its code is taken (codes are unique across farms: the broker's user names). */
export async function insertProbe(row: {
  farmId: string;
  zoneId: string | null;
  code: string;
  label: string | null;
  metrics: string[];
  reportIntervalS: number;
  tokenHash: string;
}): Promise<ProbeRow | null> {
  const [p] = await db().insert(probes).values(row).onConflictDoNothing({ target: probes.code }).returning(shown);
  return p ?? null;
}

const ofFarm = (farmId: string, id: number) => and(eq(probes.id, id), eq(probes.farmId, farmId));

export async function patchProbe(
  farmId: string,
  id: number,
  patch: Partial<Pick<Probe, "zoneId" | "label" | "reportIntervalS" | "archivedAt" | "metrics">>,
): Promise<ProbeRow | null> {
  if (!hasChanges(patch)) {
    const [p] = await db().select(shown).from(probes).where(ofFarm(farmId, id));
    return p ?? null;
  }
  const [p] = await db().update(probes).set(patch).where(ofFarm(farmId, id)).returning(shown);
  return p ?? null;
}

/** Whether the probe was there to take the new hash. */
export async function setProbeTokenHash(farmId: string, id: number, tokenHash: string): Promise<boolean> {
  const changed = await db().update(probes).set({ tokenHash }).where(ofFarm(farmId, id)).returning({ id: probes.id });
  return changed.length > 0;
}

export async function zoneFarm(zoneId: string) {
  const r = await db().execute(sql`select b.farm_id as "farmId" from zones z join bins b on b.id = z.bin_id where z.id = ${zoneId}`);
  return (r.rows[0] as { farmId: string } | undefined)?.farmId ?? null;
}
