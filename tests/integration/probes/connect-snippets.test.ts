// The connect snippets run for real: the mosquitto_pub command as the page builds it, against the
// ingest broker, and the curl command against the running app; each reading is stored. A probe that
// only posts over HTTP reads "reporting" on its page, and a refused message's reason shows there in plain words.
import { execFile } from "node:child_process";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { getProbeByCode } from "@/db/queries/probes";
import { startIngest, type Ingest } from "@/ingest/service";
import { curlCommand, mosquittoPubCommand, type PublicAddresses } from "@/lib/domain/probe-snippets";
import { REFUSAL_SENTENCES } from "@/lib/domain/refusal-words";
import { acceptHttpTelemetry } from "@/lib/server/ingest/http-ingest";
import { probeHealth } from "@/lib/server/probes/probe-health";
import { anonymous, appUrl, signIn, type Session } from "../../helpers/app";
import { countReadings, createProbes, type TestProbe } from "../ingest/helpers";
import { addMember, makeFarm, type TestFarm } from "../series/fixtures";

let ingest: Ingest;
let c: pg.Client;
let farm: TestFarm;
let owner: Session;
const PASSWORD = "connect-snippets-pw-1";

beforeAll(async () => {
  ingest = await startIngest({ port: 0, batch: { maxWaitMs: 10 } });
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  farm = await makeFarm(c, { zones: ["fresh"], probes: ["fresh", "fresh", "fresh", "fresh"] });
  owner = await signIn(await addMember(c, farm.farmId, "owner", PASSWORD), PASSWORD);
});
afterAll(async () => {
  await ingest.close();
  await c.end();
});

/** Runs a command line as a person would paste it into a shell. */
function sh(line: string): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile("/bin/sh", ["-c", line], { timeout: 20_000 }, (err, stdout, stderr) =>
      resolve({ code: err ? ((err as { code?: number }).code ?? 1) : 0, stdout, stderr }),
    );
  });
}

const addresses = (mqttPort: number): PublicAddresses => ({
  mqtt: { host: "127.0.0.1", port: mqttPort, tls: false },
  ingestUrl: `${appUrl()}/api/ingest`,
  loopback: true,
});

type Health = {
  presence: { state: string };
  latest: { metric: string; value: number }[];
  refusals: { sentence: string; details: string[]; excerpt: string | null; source: string }[];
};
const healthOf = async (probeId: number) => {
  const res = await owner.fetch(`/api/probes/${probeId}/health`);
  expect(res.status).toBe(200);
  return (await res.json()) as Health;
};

describe("the connect snippets, run for real", () => {
  it("the mosquitto_pub command as shown stores its reading, and the probe then reads reporting", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const before = await probeHealth({ farmId: p.farmId }, p.id);
    expect(before.presence.state).toBe("no-reading-yet");
    const r = await sh(mosquittoPubCommand(addresses(ingest.port), p));
    expect(r).toMatchObject({ code: 0, stderr: "" });
    // QoS 1: mosquitto_pub exits after the PUBACK, which follows the commit.
    expect((await countReadings([p.id])).rows).toBe(1);
    const after = await probeHealth({ farmId: p.farmId }, p.id);
    expect(after.presence.state).toBe("reporting");
    expect(after.latest).toMatchObject([{ metric: "temperature", value: 21.5 }]);
  });

  it("the curl command as shown stores its reading over HTTP, and that probe, with no MQTT connection, reads reporting", async () => {
    const p = farm.probes[0]!;
    expect((await healthOf(p.id)).presence.state).toBe("no-reading-yet");
    const r = await sh(curlCommand(addresses(ingest.port), p));
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout)).toMatchObject({ stored: 1, rejected: 0 });
    const stored = await c.query(`select metric::text, value from readings where probe_id = $1`, [p.id]);
    expect(stored.rows).toEqual([{ metric: "temperature", value: 21.5 }]);
    const seen = await c.query(`select last_seen_at, online from probes where id = $1`, [p.id]);
    expect(seen.rows[0].last_seen_at).not.toBeNull();
    expect(seen.rows[0].online).toBe(false);
    const h = await healthOf(p.id);
    expect(h.presence.state).toBe("reporting");
    // The page says it too, rendered on the server.
    const page = await (await owner.fetch(`/farms/${farm.farmId}/probes/${p.id}`)).text();
    expect(page).toContain('data-probe-state="reporting"');
    expect(page).not.toContain("Waiting for the first reading");
  });
});

describe("refusals on the probe's page", () => {
  it("a probe that has sent nothing is waiting for its first reading", async () => {
    const p = farm.probes[1]!;
    const page = await (await owner.fetch(`/farms/${farm.farmId}/probes/${p.id}`)).text();
    expect(page).toContain("Waiting for the first reading");
    expect(page).toContain("None: nothing sent by this probe has been refused.");
  });

  it("messages that arrive but are refused: the latest reason in plain words while waiting, and the list with the first bytes escaped", async () => {
    const p = farm.probes[2]!;
    const t = Math.floor(Date.now() / 1000);
    const post = (body: string) =>
      fetch(`${appUrl()}/api/ingest`, {
        method: "POST",
        headers: { authorization: `Bearer ${p.code}.${p.token}`, "content-type": "application/senml+json" },
        body,
      });
    expect((await post("{\u0001not json")).status).toBe(400);
    // "C" is not a SenML unit; "Cel" is (RFC 8428 Table 6).
    expect((await post(JSON.stringify([{ bn: `urn:dev:wormward:${p.code}:`, bt: t, n: "temp", u: "C", v: 20 }]))).status).toBe(202);
    const h = await healthOf(p.id);
    expect(h.presence.state).toBe("no-reading-yet");
    expect(h.refusals.map((r) => r.sentence)).toEqual([REFUSAL_SENTENCES["bad-unit"], REFUSAL_SENTENCES["malformed-json"]]);
    expect(h.refusals[1]!.excerpt).toBe("{\\x01not json");
    expect(h.refusals[0]!.source).toBe("http");

    const page = await (await owner.fetch(`/farms/${farm.farmId}/probes/${p.id}`)).text();
    expect(page).toContain("Waiting for the first reading");
    expect(page).toContain("Messages arrive but are refused.");
    // React escapes text; the quotes of the sentence come out as entities.
    expect(page.replace(/&quot;|&#x27;/g, '"')).toContain(REFUSAL_SENTENCES["bad-unit"]);
    expect(page).toContain("{\\x01not json");
  });

  it("another farm's owner, and a signed-out caller, do not see this probe's health", async () => {
    const other = await makeFarm(c, { zones: ["fresh"], probes: [] });
    const stranger = await signIn(await addMember(c, other.farmId, "owner", PASSWORD), PASSWORD);
    const p = farm.probes[3]!;
    expect((await stranger.fetch(`/api/probes/${p.id}/health`)).status).toBe(404);
    expect((await anonymous().fetch(`/api/probes/${p.id}/health`)).status).toBe(401);
  });

  it("HTTP ingest in the worker's database updates last_seen_at as MQTT does", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    const probe = (await getProbeByCode(p.code))!;
    expect(probe.lastSeenAt).toBeNull();
    await acceptHttpTelemetry(probe, { bytes: Buffer.from("[]") }).catch(() => undefined);
    expect((await getProbeByCode(p.code))!.lastSeenAt).not.toBeNull();
  });
});
