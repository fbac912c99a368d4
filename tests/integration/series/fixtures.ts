// Rows a test needs in a database it is given (the worker's own, or the app's): a farm with a bin,
// its zones and probes with known tokens, and optionally people with roles. Codes are unique per
// call, so files sharing a database never see each other's probes.
import { randomBytes } from "node:crypto";
import pg from "pg";
import { hashPassword } from "@/lib/server/auth/password";
import { hashToken } from "@/lib/server/auth/tokens";

export type TestProbe = { id: number; code: string; token: string; zoneId: string; zone: string };
export type TestFarm = { farmId: string; binId: string; zones: Record<string, string>; probes: TestProbe[] };

const uniq = () => randomBytes(4).toString("hex");

export async function withClient<T>(url: string, fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    return await fn(c);
  } finally {
    await c.end();
  }
}

/** A farm with one bin whose zones are `zones`, and one probe per entry of `probesPerZone`. */
export async function makeFarm(c: pg.Client, opts: { zones?: string[]; probes?: string[]; name?: string; timezone?: string } = {}): Promise<TestFarm> {
  const zoneKinds = opts.zones ?? ["fresh", "working", "curing"];
  const tag = uniq();
  const farm = await c.query(`insert into farms (name, timezone) values ($1, $2) returning id`, [opts.name ?? `Test farm ${tag}`, opts.timezone ?? "UTC"]);
  const farmId = farm.rows[0].id as string;
  const bin = await c.query(`insert into bins (farm_id, name, style, species) values ($1, $2, 'tote', 'eisenia-fetida') returning id`, [farmId, `Bin ${tag}`]);
  const binId = bin.rows[0].id as string;
  const zones: Record<string, string> = {};
  for (const [i, kind] of zoneKinds.entries()) {
    const z = await c.query(`insert into zones (bin_id, position, kind) values ($1, $2, $3) returning id`, [binId, i + 1, kind]);
    zones[kind] = z.rows[0].id as string;
  }
  const probes: TestProbe[] = [];
  for (const [i, zone] of (opts.probes ?? zoneKinds).entries()) {
    const code = `t${tag}-${i + 1}`;
    const token = randomBytes(12).toString("base64url");
    const zoneId = zones[zone]!;
    const p = await c.query(`insert into probes (farm_id, zone_id, code, token_hash, metrics) values ($1, $2, $3, $4, $5) returning id`, [
      farmId,
      zoneId,
      code,
      hashToken(token),
      ["temperature", "moisture", "battery", "signal", "ammonia"],
    ]);
    probes.push({ id: p.rows[0].id as number, code, token, zoneId, zone });
  }
  return { farmId, binId, zones, probes };
}

/** A person with a role on a farm; returns the e-mail to sign in with. */
export async function addMember(c: pg.Client, farmId: string, role: "owner" | "keeper" | "viewer", password: string): Promise<string> {
  const email = `${role}-${uniq()}@example.org`;
  const u = await c.query(`insert into users (email, name, password_hash) values ($1, $2, $3) returning id`, [
    email,
    `A ${role}`,
    await hashPassword(password),
  ]);
  await c.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, $3)`, [u.rows[0].id, farmId, role]);
  return email;
}

export const until = async (what: string, check: () => Promise<boolean> | boolean, timeoutMs = 15_000, stepMs = 50) => {
  const end = Date.now() + timeoutMs;
  for (;;) {
    if (await check()) return;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, stepMs));
  }
};
