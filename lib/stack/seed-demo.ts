import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "@/db/schema";
import { isEmpty, seedDemo, seedIngredients, type SeedCounts } from "@/db/seed";

// The demo people share a published password, so they go only where the demo was asked for: the
// launcher's own local cluster, or a DATABASE_URL database with WORMWARD_DEMO=1. WORMWARD_DEMO=0
// keeps them off the local cluster too.
export function demoWanted(opts: { ownCluster: boolean; flag: string | undefined }): boolean {
  return opts.flag === "1" || (opts.ownCluster && opts.flag !== "0");
}

/** What the start did: `counts` and `ms` only when it seeded the demo just now. */
export type SeedResult = { demo: boolean; seeded: boolean; counts?: SeedCounts; ms?: number };

// Keeps the ingredient library current; seeds the demo scenario when it is wanted and the database
// is empty. An already-seeded database costs one count of the farms table and the library upsert:
// nothing here reads the readings.
export async function seedForStart(
  url: string,
  probesFile: string,
  opts: { ownCluster: boolean; flag: string | undefined; historyDays?: number },
): Promise<SeedResult> {
  const demo = demoWanted(opts);
  const pool = new pg.Pool({ connectionString: url, max: 3 });
  try {
    const d = drizzle(pool, { schema });
    if (!demo || !(await isEmpty(d))) {
      await seedIngredients(d); // library rows added since the last start
      return { demo, seeded: false };
    }
    const started = performance.now();
    const { counts } = await seedDemo(d, { probesFile, historyDays: opts.historyDays });
    return { demo, seeded: true, counts, ms: Math.round(performance.now() - started) };
  } finally {
    await pool.end();
  }
}

/** One line for the launcher: how long the seed took and what it wrote. */
export function seedSummary(r: SeedResult): string {
  if (!r.seeded || !r.counts) return r.demo ? "Demo farm already seeded; kept as it is." : "No demo farm (not asked for).";
  const c = r.counts;
  const n = (x: number) => x.toLocaleString("en-GB");
  return (
    `Demo farm seeded in ${((r.ms ?? 0) / 1000).toFixed(1)} s: ${n(c.readings)} readings, ${n(c.rollups)} hourly rollups, ` +
    `${c.feedings} feedings, ${c.waterings} waterings, ${c.shifts} shifts, ${c.harvests} harvests, ${c.notes} notes, ${c.alerts} alerts.`
  );
}
