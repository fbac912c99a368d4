import { AsyncLocalStorage } from "node:async_hooks";
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { env } from "@/lib/server/env";
import { isReplicaTrouble, ReplicaGuard, troubleWords, type ReplicaStatus } from "./replica";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;

type Replica = { pool: pg.Pool; db: Db; guard: ReplicaGuard };

// One pool per process (and one for the read replica when there is one), kept across hot reloads in development.
const g = globalThis as unknown as {
  __wormwardPool?: pg.Pool;
  __wormwardDb?: Db;
  __wormwardReplica?: Replica | null;
  __wormwardReadScope?: AsyncLocalStorage<Db>;
};
const readScope = (g.__wormwardReadScope ??= new AsyncLocalStorage<Db>());

export function pool(): pg.Pool {
  if (!g.__wormwardPool) {
    // A connect that hangs (a lost route, not a refused port) fails after 5 s, so the ingest's
    // writer retries and a page answers with an error instead of waiting for ever.
    g.__wormwardPool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 5_000 });
    g.__wormwardPool.on("error", (err) => console.error("[wormward:db] idle client error:", err.message));
  }
  return g.__wormwardPool;
}

/** The primary, except inside onReplica, where it is the replica chosen for that read. */
export function db(): Db {
  const scoped = readScope.getStore();
  if (scoped) return scoped;
  g.__wormwardDb ??= drizzle(pool(), { schema });
  return g.__wormwardDb;
}

function replica(): Replica | null {
  if (g.__wormwardReplica === undefined) {
    const { DATABASE_REPLICA_URL: url, REPLICA_MAX_LAG_MS: maxLagMs, REPLICA_CHECK_MS: checkMs } = env();
    if (!url) return (g.__wormwardReplica = null);
    // Its own name, so the replica's pg_stat_activity tells our reads apart; a replica that does not
    // answer is given up after 2 s (connect) or 15 s (a query), our choice, and the read goes to the primary.
    const p = new pg.Pool({ connectionString: url, max: 10, connectionTimeoutMillis: 2_000, query_timeout: 15_000, application_name: "wormward-read" });
    p.on("error", (err) => console.error("[wormward:db] idle replica client error:", err.message));
    g.__wormwardReplica = { pool: p, db: drizzle(p, { schema }), guard: new ReplicaGuard(pool(), p, { maxLagMs, checkMs }) };
  }
  return g.__wormwardReplica;
}

/** For a read a lag of up to REPLICA_MAX_LAG_MS cannot hurt: the replica while it is that fresh,
 * else the primary. Never for a write, nor a read of something just written. */
export function readDb(): Db {
  const r = replica();
  return r?.guard.usable() ? r.db : db();
}

/** Runs `read` with every db() in it on the replica while the replica is fresh (readDb); when the
 * replica fails under it, runs it again on the primary, so a stopped replica takes no page down.
 * Only reads: the replica refuses writes. */
export async function onReplica<T>(read: () => Promise<T>): Promise<T> {
  const r = replica();
  if (!r?.guard.usable()) return read();
  try {
    return await readScope.run(r.db, read);
  } catch (err) {
    if (!isReplicaTrouble(err)) throw err;
    r.guard.failed(err);
    console.error("[wormward:db] a read on the replica failed, read again on the primary:", troubleWords(err));
    return read();
  }
}

/** Where reads would go now and why; null without a replica. */
export function replicaStatus(): ReplicaStatus | null {
  return replica()?.guard.status() ?? null;
}

export async function closeDb() {
  const p = g.__wormwardPool;
  const r = g.__wormwardReplica;
  g.__wormwardPool = undefined;
  g.__wormwardDb = undefined;
  g.__wormwardReplica = undefined;
  await Promise.all([p?.end(), r?.pool.end()]);
}

export { schema };
