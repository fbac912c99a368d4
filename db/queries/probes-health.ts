// One probe's health as its page shows it: its status row, its latest value of each metric and its
// latest refused messages.
import { sql } from "drizzle-orm";
import { db } from "@/db";
import type { RejectSource } from "@/lib/domain/vocabulary";

export type ProbeHealthRow = {
  id: number;
  code: string;
  label: string | null;
  binId: string | null;
  binSpecies: string | null;
  reportIntervalS: number;
  lastSeenAt: Date | null;
  connected: boolean;
  archivedAt: Date | null;
};

const at = (v: Date | string | null) => (v === null ? null : new Date(v));

/** The probe of this farm, or null. */
export async function getProbeHealthRow(farmId: string, probeId: number): Promise<ProbeHealthRow | null> {
  const r = await db().execute<ProbeHealthRow>(sql`
    select p.id, p.code, p.label, b.id as "binId", b.species as "binSpecies", p.report_interval_s as "reportIntervalS",
           p.last_seen_at as "lastSeenAt", p.online as "connected", p.archived_at as "archivedAt"
    from probes p
    left join zones z on z.id = p.zone_id
    left join bins b on b.id = z.bin_id
    where p.farm_id = ${farmId} and p.id = ${probeId}`);
  const row = r.rows[0];
  // Raw SQL hands timestamps over as text: made Dates here, as the type says.
  return row ? { ...row, lastSeenAt: at(row.lastSeenAt), archivedAt: at(row.archivedAt) } : null;
}

export type LatestReading = { metric: string; ts: Date; value: number };

/** The latest stored reading of each metric the probe has sent. */
export async function listLatestProbeReadings(probeId: number): Promise<LatestReading[]> {
  // One short walk of the readings key (probe, metric, ts) per metric, not a scan of the whole series.
  const r = await db().execute<LatestReading>(sql`
    select m.metric::text as metric, r.ts, r.value
    from unnest(enum_range(null::metric)) m(metric)
    cross join lateral (
      select ts, value from readings where probe_id = ${probeId} and metric = m.metric order by ts desc limit 1
    ) r
    order by m.metric`);
  return r.rows.map((row) => ({ ...row, ts: new Date(row.ts) }));
}

export type RefusalRow = {
  id: number;
  receivedAt: Date;
  source: RejectSource;
  topic: string | null;
  reason: string;
  records: number;
  excerpt: string | null;
};

/** The probe's latest refused messages, newest first (rejected_probe_time_idx). */
export async function listProbeRefusals(probeId: number, limit: number): Promise<RefusalRow[]> {
  const r = await db().execute<RefusalRow>(sql`
    select id, received_at as "receivedAt", source::text as source, topic, reason, records, excerpt
    from rejected_messages
    where probe_id = ${probeId}
    order by received_at desc, id desc
    limit ${limit}`);
  return r.rows.map((row) => ({ ...row, id: Number(row.id), receivedAt: new Date(row.receivedAt) }));
}

/**
 * Records a refusal of a known probe that its message cannot carry itself (a wrong token, a topic
 * not its own), at most one per probe and code in `everyMs`, so that a stranger who knows a probe's
 * code cannot fill the table. Whether a row was written.
 */
export async function recordProbeRefusalThrottled(
  row: { farmId: string; probeId: number; source: RejectSource; topic: string | null; code: string; reason: string },
  everyMs: number,
): Promise<boolean> {
  const r = await db().execute(sql`
    insert into rejected_messages (farm_id, probe_id, source, topic, reason, records)
    select ${row.farmId}, ${row.probeId}, ${row.source}::reject_source, ${row.topic}, ${`${row.code}: ${row.reason}`}, 1
    where not exists (
      select 1 from rejected_messages
      where probe_id = ${row.probeId} and reason like ${`${row.code}:%`} and received_at > now() - make_interval(secs => ${everyMs / 1000})
    )`);
  return (r.rowCount ?? 0) > 0;
}
