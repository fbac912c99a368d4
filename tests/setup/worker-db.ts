// Each vitest worker gets its own database made from the migrated template, so files never
// see each other's rows. Refuses anything that is not on loopback.
import pg from "pg";
import { inject } from "vitest";

const adminUrl = inject("adminUrl");
const host = new URL(adminUrl).hostname;
if (!["127.0.0.1", "localhost", "::1"].includes(host)) {
  throw new Error(`Tests refuse a database that is not on loopback (${host}).`);
}
const name = `wormward_w${process.env.VITEST_POOL_ID ?? "0"}`;
const c = new pg.Client({ connectionString: adminUrl });
await c.connect();
try {
  const r = await c.query("select 1 from pg_database where datname = $1", [name]);
  if (r.rowCount === 0) await c.query(`create database "${name}" template wormward_template`);
} finally {
  await c.end();
}
process.env.DATABASE_URL = adminUrl.replace(/\/postgres$/, `/${name}`);
