// probes.online as a copy of the shared presence registry (ingest/broker-backends.ts), for the pages
// that read it: with several ingest nodes, the registry in Redis is the truth and this is made to
// agree with it.
import { sql } from "drizzle-orm";
import { db } from "@/db";
import type { Executor } from "./readings";

/** Sets online for exactly the probes named in `connected`; returns how many rows changed. */
export async function syncProbesOnline(connected: readonly string[], ex: Executor = db()): Promise<number> {
  const r = await ex.execute(sql`
    update probes set online = (code = any(${sql.param([...connected])}::text[]))
    where online is distinct from (code = any(${sql.param([...connected])}::text[]))`);
  return r.rowCount ?? 0;
}
