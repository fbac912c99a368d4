// Shared set-up for the ingest tests: probes in the per-worker database, SenML packs, MQTT clients.
import { randomBytes } from "node:crypto";
import { sql } from "drizzle-orm";
import { connectAsync, type IClientOptions, type MqttClient } from "mqtt";
import { db, type Db } from "@/db";
import { bins, farms, probes, zones } from "@/db/schema";
import { hashToken } from "@/lib/server/auth/tokens";
import { probeBaseName } from "@/lib/domain/metrics";

export { freePort } from "../../setup/global";

export type TestProbe = { id: number; code: string; token: string; zoneId: string; farmId: string };

/** A farm with one bin and zone, and `n` probes with fresh codes and tokens. */
export async function createProbes(n: number, opts: { d?: Db; calibration?: { slope: number; intercept: number } } = {}): Promise<TestProbe[]> {
  const d = opts.d ?? db();
  const tag = randomBytes(4).toString("hex");
  const [farm] = await d
    .insert(farms)
    .values({ name: `Ingest test ${tag}` })
    .returning();
  const [bin] = await d.insert(bins).values({ farmId: farm!.id, name: "Test bin", style: "tote", species: "eisenia-fetida" }).returning();
  const [zone] = await d.insert(zones).values({ binId: bin!.id, position: 1, kind: "working" }).returning();
  const made: TestProbe[] = [];
  for (let i = 0; i < n; i++) {
    const code = `t${tag}-${i}`;
    const token = randomBytes(18).toString("base64url");
    const calibration = opts.calibration ? { ...opts.calibration, r2: 1, fittedAt: new Date().toISOString(), points: 5 } : null;
    const [p] = await d
      .insert(probes)
      .values({ farmId: farm!.id, zoneId: zone!.id, code, tokenHash: hashToken(token), metrics: ["temperature", "moisture"], calibration })
      .returning();
    made.push({ id: p!.id, code, token, zoneId: zone!.id, farmId: farm!.id });
  }
  return made;
}

/** One temperature reading at `seconds` (epoch), as a probe would send it. */
export const tempPack = (code: string, seconds: number, celsius: number) =>
  JSON.stringify([{ bn: probeBaseName(code), bt: seconds, n: "temp", u: "Cel", v: celsius }]);

export function connectProbe(port: number, probe: TestProbe, extra: IClientOptions = {}): Promise<MqttClient> {
  return connectAsync(`mqtt://127.0.0.1:${port}`, {
    clientId: probe.code,
    username: probe.code,
    password: probe.token,
    protocolVersion: 4,
    reconnectPeriod: 0, // tests that want reconnects say so
    connectTimeout: 5000,
    ...extra,
  });
}

export async function waitFor<T>(what: string, fn: () => Promise<T>, done: (v: T) => boolean, timeoutMs = 30_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (done(v)) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}; last value ${JSON.stringify(v)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

export async function countReadings(probeIds: number[], d: Db = db()): Promise<{ rows: number; distinct: number; rolled: number }> {
  const r = await d.execute<{ rows: number; distinct: number; rolled: number }>(sql`
    select
      (select count(*)::int from readings where probe_id = any(${sql.param(probeIds)}::int[])) as rows,
      (select count(distinct (probe_id, metric, ts))::int from readings where probe_id = any(${sql.param(probeIds)}::int[])) as distinct,
      (select coalesce(sum(count), 0)::int from reading_rollups where probe_id = any(${sql.param(probeIds)}::int[])) as rolled`);
  return r.rows[0]!;
}

export async function rejectionsOf(probeId: number, d: Db = db()) {
  const r = await d.execute<{ reason: string; records: number; topic: string | null; excerpt: string | null; source: string; farm_id: string | null }>(
    sql`select reason, records, topic, excerpt, source, farm_id from rejected_messages where probe_id = ${probeId} order by id`,
  );
  return r.rows;
}
