import pg from "pg";
import { inject } from "vitest";
import { hashPassword } from "@/lib/server/auth/password";
import { signIn, type Session } from "../../helpers/app";

export type Crew = { db: pg.Client; farmId: string; owner: Session; keeper: Session; otherKeeper: Session; viewer: Session; close: () => Promise<void> };

// A farm of the test's own (the demo owner and keeper in their demo roles, plus a second keeper and a
// viewer), so what these tests log stays out of the demo farm the browser tests look at.
export async function crewFarm(name: string): Promise<Crew> {
  const db = new pg.Client({ connectionString: inject("appDbUrl") });
  await db.connect();
  const id = async (email: string) => (await db.query(`select id from users where email = $1`, [email])).rows[0].id as string;
  const farmId = (await db.query(`insert into farms (name) values ($1) returning id`, [name])).rows[0].id as string;
  const hash = await hashPassword("logbook-test-pass");
  const tag = Math.random().toString(36).slice(2, 9);
  const other = (
    await db.query(`insert into users (email, name, password_hash) values ($1, 'Second Keeper', $2) returning id`, [`keeper2-${tag}@example.org`, hash])
  ).rows[0].id;
  const viewer = (
    await db.query(`insert into users (email, name, password_hash) values ($1, 'Class Viewer', $2) returning id`, [`viewer-${tag}@example.org`, hash])
  ).rows[0].id;
  await db.query(`insert into memberships (user_id, farm_id, role) values ($1, $5, 'owner'), ($2, $5, 'keeper'), ($3, $5, 'keeper'), ($4, $5, 'viewer')`, [
    await id("noor@alder-row.example"),
    await id("tomas@alder-row.example"),
    other,
    viewer,
    farmId,
  ]);
  return {
    db,
    farmId,
    owner: await signIn("noor@alder-row.example", "alder-row-demo"),
    keeper: await signIn("tomas@alder-row.example", "alder-row-demo"),
    otherKeeper: await signIn(`keeper2-${tag}@example.org`, "logbook-test-pass"),
    viewer: await signIn(`viewer-${tag}@example.org`, "logbook-test-pass"),
    close: async () => {
      await db.query(`delete from farms where id = $1`, [farmId]);
      await db.query(`delete from users where id = any($1)`, [[other, viewer]]);
      await db.end();
    },
  };
}

export async function newBin(owner: Session, farmId: string, zoneCount = 3) {
  const res = await owner.fetch(`/api/farms/${farmId}/bins`, {
    method: "POST",
    json: { name: `Log ${Math.random().toString(36).slice(2, 7)}`, style: "flow-through", species: "eisenia-fetida", zoneCount },
  });
  if (res.status !== 201) throw new Error(`bin not made: ${res.status} ${await res.text()}`);
  return ((await res.json()) as { bin: { id: string; zones: { id: string; kind: string }[] } }).bin;
}

export async function json<T>(res: Response): Promise<T> {
  return (await res.json()) as T;
}
