import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { env } from "@/lib/server/env";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;

// One pool per process, kept across hot reloads in development.
const g = globalThis as unknown as { __wormwardPool?: pg.Pool; __wormwardDb?: Db };

export function pool(): pg.Pool {
  if (!g.__wormwardPool) {
    // A connect that hangs (a lost route, not a refused port) fails after 5 s, so the ingest's
    // writer retries and a page answers with an error instead of waiting for ever.
    g.__wormwardPool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 5_000 });
    g.__wormwardPool.on("error", (err) => console.error("[wormward:db] idle client error:", err.message));
  }
  return g.__wormwardPool;
}

export function db(): Db {
  g.__wormwardDb ??= drizzle(pool(), { schema });
  return g.__wormwardDb;
}

export async function closeDb() {
  const p = g.__wormwardPool;
  g.__wormwardPool = undefined;
  g.__wormwardDb = undefined;
  await p?.end();
}

export { schema };
