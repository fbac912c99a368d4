import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "@/db/schema";
import { isEmpty, seedDemo, seedIngredients } from "@/db/seed";

// The demo people share a published password, so they go only where the demo was asked for: the
// launcher's own local cluster, or a DATABASE_URL database with WORMWARD_DEMO=1. WORMWARD_DEMO=0
// keeps them off the local cluster too.
export function demoWanted(opts: { ownCluster: boolean; flag: string | undefined }): boolean {
  return opts.flag === "1" || (opts.ownCluster && opts.flag !== "0");
}

export type SeedResult = { demo: boolean; seeded: boolean };

// Keeps the ingredient library current; seeds the demo scenario when it is wanted and the database
// is empty.
export async function seedForStart(url: string, probesFile: string, opts: { ownCluster: boolean; flag: string | undefined }): Promise<SeedResult> {
  const demo = demoWanted(opts);
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  try {
    const d = drizzle(pool, { schema });
    if (!demo || !(await isEmpty(d))) {
      await seedIngredients(d); // library rows added since the last start
      return { demo, seeded: false };
    }
    await seedDemo(d, { probesFile });
    return { demo, seeded: true };
  } finally {
    await pool.end();
  }
}
