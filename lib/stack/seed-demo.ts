import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "@/db/schema";
import { isEmpty, seedDemo, seedIngredients } from "@/db/seed";

// Seeds the demo scenario into an empty database only (returns whether it did); keeps the
// ingredient library current either way.
export async function seedIfEmpty(url: string, probesFile: string): Promise<boolean> {
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  try {
    const d = drizzle(pool, { schema });
    if (!(await isEmpty(d))) {
      await seedIngredients(d); // library rows added since the last start
      return false;
    }
    await seedDemo(d, { probesFile });
    return true;
  } finally {
    await pool.end();
  }
}
