import { timingSafeEqual } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { probes, type Probe } from "@/db/schema";
import { hashToken } from "@/lib/server/auth/tokens";
import { AppError } from "@/lib/domain/errors";
import { hasChanges } from "./patch";
import type { Executor } from "./readings";

export async function getProbeByCode(code: string, ex: Executor = db()): Promise<Probe | null> {
  const [p] = await ex.select().from(probes).where(eq(probes.code, code));
  return p ?? null;
}

// Compared against when the code is unknown, so a miss costs the same as a wrong token.
const NO_HASH = Buffer.from(hashToken(""), "hex");

export async function verifyProbeToken(code: string, token: string, ex: Executor = db()): Promise<Probe | null> {
  const probe = await getProbeByCode(code, ex);
  const given = Buffer.from(hashToken(token), "hex");
  const stored = probe && /^[0-9a-f]{64}$/.test(probe.tokenHash) ? Buffer.from(probe.tokenHash, "hex") : NO_HASH;
  const same = timingSafeEqual(given, stored);
  return probe && same && !probe.archivedAt ? probe : null;
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
  if (rows.length === 0) return;
  const col = <T>(f: (u: ProbeStatusUpdate) => T | null | undefined) => sql.param(rows.map((u) => f(u) ?? null));
  await ex.execute(sql`
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
    where p.id = s.id`);
}

export async function setProbeOnline(code: string, online: boolean, ex: Executor = db()): Promise<void> {
  await ex.update(probes).set({ online }).where(eq(probes.code, code));
}

// Probe management (owners): a token is made here, returned once, and only its hash is kept.
export async function listFarmProbesWithStatus(farmId: string) {
  const r = await db().execute(sql`
    select p.id, p.code, p.label, p.zone_id as "zoneId", z.kind as "zoneKind", z.position as "zonePosition",
           b.id as "binId", b.name as "binName", p.metrics, p.report_interval_s as "reportIntervalS",
           p.last_seen_at as "lastSeenAt", p.online, p.battery_v as "batteryV", p.signal_dbm as "signalDbm",
           p.firmware, p.calibration, p.archived_at as "archivedAt"
    from probes p
    left join zones z on z.id = p.zone_id
    left join bins b on b.id = z.bin_id
    where p.farm_id = ${farmId}
    order by p.archived_at nulls first, b.name nulls last, z.position, p.code`);
  return r.rows;
}

export async function createProbe(input: {
  farmId: string;
  zoneId: string | null;
  code: string;
  label: string | null;
  metrics: string[];
  reportIntervalS: number;
  token: string;
}) {
  const { token, ...row } = input;
  try {
    const [p] = await db()
      .insert(probes)
      .values({ ...row, tokenHash: hashToken(token) })
      .returning();
    return p!;
  } catch (e) {
    const code = (e as { code?: string; cause?: { code?: string } }).cause?.code ?? (e as { code?: string }).code;
    if (code === "23505") throw new AppError("conflict", "Another probe already uses that code.", "code");
    throw e;
  }
}

export async function updateProbe(id: number, patch: Partial<Pick<Probe, "zoneId" | "label" | "reportIntervalS" | "archivedAt" | "metrics">>) {
  if (!hasChanges(patch)) {
    const [p] = await db().select().from(probes).where(eq(probes.id, id));
    return p ?? null;
  }
  const [p] = await db().update(probes).set(patch).where(eq(probes.id, id)).returning();
  return p ?? null;
}

export async function replaceProbeToken(id: number, token: string) {
  const [p] = await db()
    .update(probes)
    .set({ tokenHash: hashToken(token) })
    .where(eq(probes.id, id))
    .returning();
  return p ?? null;
}

export async function zoneFarm(zoneId: string) {
  const r = await db().execute(sql`select b.farm_id as "farmId" from zones z join bins b on b.id = z.bin_id where z.id = ${zoneId}`);
  return (r.rows[0] as { farmId: string } | undefined)?.farmId ?? null;
}
