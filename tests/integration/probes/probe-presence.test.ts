// The probe list's presence against the real database and broker: "reporting" and "silent since"
// go by what was heard from the probe and the silent-probe rule's line, not by its connection.
import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { getProbeByCode } from "@/db/queries/probes";
import { rules } from "@/db/schema";
import { startIngest, type Ingest } from "@/ingest/service";
import { probeTopics } from "@/lib/domain/vocabulary";
import { acceptHttpTelemetry } from "@/lib/server/ingest/http-ingest";
import { listProbes } from "@/lib/server/probes/list-probes";
import { connectProbe, createProbes, tempPack, waitFor, type TestProbe } from "../ingest/helpers";

const MIN = 60_000;
let ingest: Ingest;
const clients: MqttClient[] = [];

beforeAll(async () => {
  ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 } });
});
afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true)));
  await ingest.close();
});

const listed = async (p: TestProbe, now = new Date()) => {
  const answer = await listProbes({ farmId: p.farmId }, now);
  return answer.probes.find((x) => x.id === p.id)!;
};

describe("probe presence in the probe list", () => {
  it("a probe that posts over HTTP, with no connection, is reporting, with its last reading's time", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const sent = new Date(Math.floor(Date.now() / 1000) * 1000 - 2 * MIN);
    await acceptHttpTelemetry((await getProbeByCode(p.code))!, { bytes: Buffer.from(tempPack(p.code, sent.getTime() / 1000, 21)) });
    const row = await listed(p);
    expect(row.connected).toBe(false);
    expect(row.presence).toMatchObject({ state: "reporting", lastReadingAt: sent, silentSince: null, silentAfterMinutes: 10 });
  });

  it("a probe that has sent nothing says it has no reading yet", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    expect((await listed(p, new Date(Date.now() + 60 * MIN))).presence).toMatchObject({ state: "no-reading-yet", lastReadingAt: null, lastHeardAt: null });
  });

  it("a connected probe that publishes and then sends nothing past the line is silent since its last message, connection or not", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const c = await connectProbe(ingest.port, p);
    clients.push(c);
    await c.publishAsync(probeTopics(p.code).readings, tempPack(p.code, Math.floor(Date.now() / 1000) - 5, 21), { qos: 1 });
    const now = await listed(p);
    expect(now.connected).toBe(true);
    expect(now.presence.state).toBe("reporting");
    const heard = now.lastSeenAt!;
    const later = await listed(p, new Date(heard.getTime() + 10 * MIN));
    expect(later.connected).toBe(true);
    expect(later.presence).toMatchObject({ state: "silent", silentSince: heard });
    await c.endAsync();
    await waitFor(
      "connection closed",
      async () => (await listed(p)).connected,
      (v) => v === false,
      10_000,
    );
  });

  it("follows the farm's own silent-probe line", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    await acceptHttpTelemetry((await getProbeByCode(p.code))!, { bytes: Buffer.from(tempPack(p.code, Math.floor(Date.now() / 1000) - 5, 21)) });
    await db()
      .insert(rules)
      .values({ farmId: p.farmId, binId: null, kind: "silent_probe", thresholds: { minSilentMinutes: 30 } });
    const heard = (await listed(p)).lastSeenAt!;
    expect((await listed(p, new Date(heard.getTime() + 29 * MIN))).presence).toMatchObject({ state: "reporting", silentAfterMinutes: 30 });
    expect((await listed(p, new Date(heard.getTime() + 30 * MIN))).presence.state).toBe("silent");
  });
});
