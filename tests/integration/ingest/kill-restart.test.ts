// `kill -9` of the ingest service in the middle of a QoS 1 stream, then a restart: the probe's
// client keeps every unacknowledged message and resends it, so nothing is lost, and the primary
// key makes every resend of an already committed reading a no-op.
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { eq } from "drizzle-orm";
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { probes } from "@/db/schema";
import { connectProbe, countReadings, createProbes, freePort, tempPack, waitFor, type TestProbe } from "./helpers";

const root = path.resolve(import.meta.dirname, "../../..");
const MESSAGES = 3000;
const WINDOW = 200; // messages in flight at most, like a probe's bounded outgoing store

let port: number;
let probe: TestProbe;
let service: ChildProcess | null = null;
let client: MqttClient | null = null;

/** Starts `ingest/main.ts` as its own process (node --import tsx: one process, so SIGKILL hits the broker itself). */
async function startService(): Promise<ChildProcess> {
  const child = spawn(process.execPath, ["--import", "tsx", "ingest/main.ts"], {
    cwd: root,
    env: { ...process.env, MQTT_PORT: String(port), MQTT_HOST: "127.0.0.1", DEBUG: "" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  child.stderr!.on("data", (b: Buffer) => (out += b.toString()));
  await new Promise<void>((resolve, reject) => {
    child.stdout!.on("data", (b: Buffer) => {
      out += b.toString();
      if (out.includes("ingest: MQTT on")) resolve();
    });
    child.once("exit", (code) => reject(new Error(`ingest exited (${code}) before listening:\n${out}`)));
  });
  return child;
}

function kill9(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    child.once("exit", () => resolve());
    child.kill("SIGKILL");
  });
}

beforeAll(async () => {
  [probe] = (await createProbes(1)) as [TestProbe];
  port = await freePort();
  service = await startService();
});
afterAll(async () => {
  await client?.endAsync(true);
  if (service && service.exitCode === null) await kill9(service);
});

describe("kill -9 of the ingest service mid-stream", () => {
  it("loses no reading and stores none twice after a restart", async () => {
    // clean: false and a fixed client id: MQTT.js keeps unacknowledged QoS 1 messages in its
    // outgoing store and resends them after reconnecting (reconnectPeriod set on purpose).
    client = await connectProbe(port, probe, { clean: false, reconnectPeriod: 200, connectTimeout: 2000 });
    let reconnects = 0;
    client.on("error", () => {}); // refused connections while the service is down
    client.on("reconnect", () => reconnects++);

    const start = Math.floor(Date.now() / 1000) - 2 * 3600;
    let acked = 0;
    let killedAt = -1;
    let inFlightAtKill = 0;
    const inFlight = new Set<Promise<void>>();
    for (let i = 0; i < MESSAGES; i++) {
      while (inFlight.size >= WINDOW) await Promise.race(inFlight);
      const p: Promise<void> = client
        .publishAsync(`wormward/${probe.code}/readings`, tempPack(probe.code, start + i, 15 + (i % 100) / 10), { qos: 1 })
        .then(() => {
          acked++;
        })
        .finally(() => inFlight.delete(p));
      inFlight.add(p);
      if (killedAt < 0 && acked >= MESSAGES / 3) {
        killedAt = acked;
        inFlightAtKill = inFlight.size;
        await kill9(service!);
        service = await startService();
      }
    }
    await Promise.all(inFlight);

    expect(killedAt).toBeGreaterThan(0);
    expect(killedAt).toBeLessThan(MESSAGES);
    expect(inFlightAtKill).toBeGreaterThan(0); // unacknowledged messages the client had to resend
    expect(reconnects).toBeGreaterThan(0);
    expect(acked).toBe(MESSAGES);
    const counts = await waitFor(
      "every reading",
      () => countReadings([probe.id]),
      (c) => c.rows >= MESSAGES,
      10_000,
    );
    // rows = messages sent: none lost, none twice; rollups counted each reading once.
    expect(counts).toEqual({ rows: MESSAGES, distinct: MESSAGES, rolled: MESSAGES });
  }, 120_000);
});

describe("SIGTERM", () => {
  it("closes cleanly: what it acknowledged is stored, its probes are marked as not connected, exit code 0", async () => {
    await client?.endAsync(true);
    if (!service || service.exitCode !== null) service = await startService();
    const [p] = (await createProbes(1)) as [TestProbe];
    client = await connectProbe(port, p);
    await waitFor(
      "connected",
      async () => (await db().select().from(probes).where(eq(probes.id, p.id)))[0]?.online,
      (v) => v === true,
      10_000,
    );
    const t = Math.floor(Date.now() / 1000) - 100;
    await Promise.all(Array.from({ length: 50 }, (_, i) => client!.publishAsync(`wormward/${p.code}/readings`, tempPack(p.code, t + i, 20), { qos: 1 })));
    const exited = new Promise<number | null>((resolve) => service!.once("exit", (code) => resolve(code)));
    service!.kill("SIGTERM");
    expect(await exited).toBe(0);
    expect((await countReadings([p.id])).rows).toBe(50);
    const [row] = await db().select().from(probes).where(eq(probes.id, p.id));
    expect(row?.online).toBe(false);
  });
});
