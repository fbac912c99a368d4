// An owner registers a probe: the token is shown once, stored only as a hash, and works with the
// broker; replacing it locks the old token out.
import { drizzle } from "drizzle-orm/node-postgres";
import { connectAsync } from "mqtt";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { schema } from "@/db";
import { startIngest, type Ingest } from "@/ingest/service";
import { probeBaseName } from "@/lib/domain/metrics";
import { hashToken } from "@/lib/server/auth/tokens";
import { signIn, type Session } from "../../helpers/app";

let db: pg.Client;
let owner: Session;
let farmId: string;
let zoneId: string;
let ingest: Ingest;
let appPool: pg.Pool;

beforeAll(async () => {
  db = new pg.Client({ connectionString: inject("appDbUrl") });
  await db.connect();
  owner = await signIn("noor@alder-row.example", "alder-row-demo");
  farmId = (await db.query(`select id from farms where name = 'Alder Row Worm Farm'`)).rows[0].id;
  zoneId = (await db.query(`select z.id from zones z join bins b on b.id = z.bin_id where b.name = 'Shed Tote'`)).rows[0].id;
  appPool = new pg.Pool({ connectionString: inject("appDbUrl"), max: 3 });
  ingest = await startIngest({ port: 0, db: drizzle(appPool, { schema }) });
});
afterAll(async () => {
  await ingest?.close();
  await appPool?.end();
  await db?.end();
});

const connect = (code: string, token: string) =>
  connectAsync(`mqtt://127.0.0.1:${ingest.port}`, { clientId: code, username: code, password: token, reconnectPeriod: 0, connectTimeout: 3000 });

describe("registering a probe", () => {
  it("shows the token once, keeps only its hash, and the probe can publish with it", async () => {
    const code = `shed-${Date.now().toString(36)}`;
    const res = await owner.fetch(`/api/farms/${farmId}/probes`, {
      method: "POST",
      json: { code, zoneId, label: "Shed tote, middle", metrics: ["temperature"] },
    });
    expect(res.status).toBe(201);
    const { probe, token } = (await res.json()) as { probe: { id: number; tokenHash?: string }; token: string };
    expect(probe.tokenHash).toBeUndefined();
    expect(token.length).toBeGreaterThanOrEqual(32);
    const stored = (await db.query(`select token_hash from probes where id = $1`, [probe.id])).rows[0].token_hash;
    expect(stored).toBe(hashToken(token));
    expect(stored).not.toContain(token);

    const list = await (await owner.fetch(`/api/farms/${farmId}/probes`)).text();
    expect(list).toContain(code);
    expect(list).not.toContain(token);
    expect(list).not.toContain(stored);
    type Listed = { timeZone: string; probes: { id: number; connected: boolean; presence: { state: string; lastReadingAt: string | null } }[] };
    const fresh0 = (JSON.parse(list) as Listed).probes.find((x) => x.id === probe.id);
    expect(fresh0).toMatchObject({ connected: false, presence: { state: "no-reading-yet", lastReadingAt: null } });

    const c = await connect(code, token);
    await c.publishAsync(`wormward/${code}/readings`, JSON.stringify([{ bn: probeBaseName(code), n: "temp", u: "Cel", v: 21.5 }]), { qos: 1 });
    await c.endAsync();
    const rows = await db.query(`select value from readings where probe_id = $1 and metric = 'temperature'`, [probe.id]);
    expect(rows.rows.map((r) => r.value)).toEqual([21.5]);
    // Reporting by its reading, though its connection has ended.
    const after = (await (await owner.fetch(`/api/farms/${farmId}/probes`)).json()) as Listed;
    expect(after.probes.find((x) => x.id === probe.id)).toMatchObject({ presence: { state: "reporting", lastReadingAt: expect.any(String) } });

    // A new token replaces the old one.
    const rot = await owner.fetch(`/api/probes/${probe.id}/token`, { method: "POST" });
    const { token: fresh } = (await rot.json()) as { token: string };
    expect(fresh).not.toBe(token);
    await expect(connect(code, token)).rejects.toThrow();
    await (await connect(code, fresh)).endAsync();
  });

  it("a code already taken and a zone of another farm are refused with the field named", async () => {
    const taken = await owner.fetch(`/api/farms/${farmId}/probes`, { method: "POST", json: { code: "alder-01" } });
    expect(taken.status).toBe(409);
    expect(((await taken.json()) as { error: { field: string } }).error.field).toBe("code");
    const other = (await db.query(`insert into farms (name) values ('Far away') returning id`)).rows[0].id;
    const bin = (await db.query(`insert into bins (farm_id, name, style, species) values ($1, 'x', 'tote', 'eisenia-fetida') returning id`, [other])).rows[0]
      .id;
    const z = (await db.query(`insert into zones (bin_id, position, kind) values ($1, 1, 'working') returning id`, [bin])).rows[0].id;
    const res = await owner.fetch(`/api/farms/${farmId}/probes`, { method: "POST", json: { code: `x-${Date.now()}`, zoneId: z } });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { error: { field: string } }).error.field).toBe("zoneId");
    const bad = await owner.fetch(`/api/farms/${farmId}/probes`, { method: "POST", json: { code: "has/slash" } });
    expect(((await bad.json()) as { error: { field: string } }).error.field).toBe("code");
  });
});
