import { sql } from "drizzle-orm";
import { db } from "@/db";

export type SetupFacts = { bin: boolean; probe: boolean; reading: boolean; alerts: boolean; crew: boolean; newestProbeId: number | null };

// What the setup checklist ticks from, in one round trip: each step is an exists() that stops at
// its first row, so a farm with years of readings answers as fast as a new one.
export async function getSetupFacts(farmId: string, userId: string): Promise<SetupFacts> {
  const r = await db().execute(sql`
    select
      exists (select 1 from bins where farm_id = ${farmId} and archived_at is null) as bin,
      (select id from probes where farm_id = ${farmId} and archived_at is null order by created_at desc, id desc limit 1) as "newestProbeId",
      exists (select 1 from readings r join probes p on p.id = r.probe_id where p.farm_id = ${farmId}) as reading,
      exists (select 1 from push_subscriptions where user_id = ${userId}) as alerts,
      exists (select 1 from invitations where farm_id = ${farmId})
        or (select count(*) from memberships where farm_id = ${farmId}) > 1 as crew`);
  const row = r.rows[0] as { bin: boolean; newestProbeId: number | null; reading: boolean; alerts: boolean; crew: boolean };
  return { ...row, probe: row.newestProbeId != null };
}
