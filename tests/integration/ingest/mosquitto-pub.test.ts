// Debian's mosquitto_pub is a client we did not write: what it sends with a probe's credentials
// lands in the database, and what it sends without the right ones does not.
import { execFile } from "node:child_process";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { probes } from "@/db/schema";
import { startIngest, type Ingest } from "@/ingest/service";
import { probeBaseName } from "@/lib/domain/metrics";
import { countReadings, createProbes, rejectionsOf, type TestProbe } from "./helpers";

let ingest: Ingest;
let a: TestProbe;
let b: TestProbe;

beforeAll(async () => {
  [a, b] = (await createProbes(2)) as [TestProbe, TestProbe];
  ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 } });
});
afterAll(async () => {
  await ingest.close();
});

function mosquittoPub(args: string[]): Promise<{ code: number; stderr: string }> {
  return new Promise((resolve) => {
    execFile("/usr/bin/mosquitto_pub", ["-h", "127.0.0.1", "-p", String(ingest.port), "-V", "mqttv311", ...args], { timeout: 15_000 }, (err, _out, stderr) =>
      resolve({ code: err ? ((err as { code?: number }).code ?? 1) : 0, stderr }),
    );
  });
}

const creds = (p: TestProbe, token = p.token) => ["-i", p.code, "-u", p.code, "-P", token];

describe("mosquitto_pub against the ingest broker", () => {
  it("stores a SenML message published with a probe's credentials", async () => {
    const t = Math.floor(Date.now() / 1000) - 60;
    const pack = JSON.stringify([
      { bn: probeBaseName(a.code), bt: t, n: "temp", u: "Cel", v: 24.5 },
      { n: "moisture", u: "/100", v: 78.25 },
      { n: "battery", u: "V", v: 3.71 },
      { n: "fw", vs: "ww-0.5.0" },
    ]);
    const r = await mosquittoPub([...creds(a), "-q", "1", "-t", `wormward/${a.code}/readings`, "-m", pack]);
    expect(r).toEqual({ code: 0, stderr: "" });

    // QoS 1: mosquitto_pub exits after the PUBACK, and the PUBACK follows the commit.
    const rows = await db().execute<{ metric: string; ts: Date; value: number }>(
      sql`select metric, ts, value from readings where probe_id = ${a.id} order by metric::text`,
    );
    expect(rows.rows.map((x) => [x.metric, new Date(x.ts).getTime() / 1000, x.value])).toEqual([
      ["battery-voltage", t, 3.71],
      ["moisture", t, 78.25],
      ["temperature", t, 24.5],
    ]);
    const [p] = await db().select().from(probes).where(eq(probes.id, a.id));
    expect(p?.firmware).toBe("ww-0.5.0");
    expect(p?.batteryV).toBeCloseTo(3.71, 5);
    expect(p?.lastSeenAt).not.toBeNull();
    expect(await rejectionsOf(a.id)).toEqual([]);
  });

  it("refuses a wrong token at connect and stores nothing", async () => {
    const t = Math.floor(Date.now() / 1000);
    const r = await mosquittoPub([
      ...creds(b, "not-the-token"),
      "-q",
      "1",
      "-t",
      `wormward/${b.code}/readings`,
      "-m",
      JSON.stringify([{ bn: probeBaseName(b.code), bt: t, n: "temp", u: "Cel", v: 20 }]),
    ]);
    expect(r.code).not.toBe(0);
    // MQTT 3.1.1 §3.2.2.3: CONNACK return code 4, bad user name or password
    expect(r.stderr).toMatch(/bad user name or password/i);
    expect((await countReadings([b.id])).rows).toBe(0);
    // The refusal shows on the probe's own page: a wrong-token row, from the MQTT door (recorded
    // beside the answer, so it may land a moment after the CONNACK).
    await expect.poll(async () => (await rejectionsOf(b.id)).map((x) => [x.source, x.reason.split(":")[0]])).toContainEqual(["mqtt", "wrong-token"]);
  });

  it("refuses a publish to another probe's topic and stores nothing", async () => {
    const t = Math.floor(Date.now() / 1000);
    const before = await countReadings([a.id, b.id]);
    const packAsB = JSON.stringify([{ bn: probeBaseName(b.code), bt: t, n: "temp", u: "Cel", v: 21 }]);
    const r = await mosquittoPub([...creds(a), "-q", "1", "-t", `wormward/${b.code}/readings`, "-m", packAsB]);
    // No negative PUBACK in MQTT 3.1.1 (§3.4): the broker closes the connection instead.
    expect(r.code).not.toBe(0);
    expect(await countReadings([a.id, b.id])).toEqual(before);
    // Nothing is held against b for a's publish (b's own wrong-token try above is its only note).
    expect((await rejectionsOf(b.id)).filter((x) => !x.reason.startsWith("wrong-token"))).toEqual([]);
  });
});
