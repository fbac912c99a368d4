import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "@/db/schema";
import { isEmpty, seedDemo } from "@/db/seed";

// Seeds the demo scenario into an empty database only; returns whether it did.
export async function seedIfEmpty(url: string, probesFile: string): Promise<boolean> {
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  try {
    const d = drizzle(pool, { schema });
    if (!(await isEmpty(d))) return false;
    await seedDemo(d, { probesFile });
    return true;
  } finally {
    await pool.end();
  }
}
