// POST /api/ingest against the real app and its database: probes that cannot speak MQTT post SenML.
import fs from "node:fs";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { appUrl } from "../../helpers/app";
import { makeFarm, type TestFarm } from "../series/fixtures";

type Answer = { stored: number; duplicates: number; rejected: number; rejections: { code: string; reason: string }[] };
type ErrorBody = { error: { code: string; message: string } };

let c: pg.Client;
let farm: TestFarm;
const demo = JSON.parse(fs.readFileSync(inject("demoProbesFile"), "utf8")) as { code: string; token: string }[];

const SENML = "application/senml+json";
const bearer = (p: { code: string; token: string }) => `Bearer ${p.code}.${p.token}`;
const post = (body: BodyInit, headers: Record<string, string>, init: RequestInit = {}) =>
  fetch(`${appUrl()}/api/ingest`, { method: "POST", body, headers, ...init });
const nowS = () => Math.round(Date.now() / 1000);
const pack = (code: string, t: number, extra: object[] = []) =>
  JSON.stringify([{ bn: `urn:dev:wormward:${code}:`, bt: t, n: "temp", u: "Cel", v: 22.5 }, { n: "moisture", u: "/100", v: 77 }, ...extra]);
const rowsOf = async (probeId: number) => Number((await c.query(`select count(*)::int as n from readings where probe_id = $1`, [probeId])).rows[0].n);
const rejectionsOf = async (probeId: number) =>
  (await c.query(`select reason, records, source::text, excerpt from rejected_messages where probe_id = $1 order by id`, [probeId])).rows as {
    reason: string;
    records: number;
    source: string;
    excerpt: string | null;
  }[];

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  farm = await makeFarm(c, { zones: ["fresh", "working"], probes: ["fresh", "working", "working", "working", "working", "working", "working", "working"] });
});

afterAll(async () => {
  await c.end();
});

describe("POST /api/ingest", () => {
  it("a demo probe's pack is stored and answered 202 with counts; bad records are refused with reasons and the good ones kept", async () => {
    const probe = demo[0]!;
    const id = (await c.query(`select id from probes where code = $1`, [probe.code])).rows[0].id as number;
    const t = nowS();
    const body = pack(probe.code, t, [
      { n: "pressure", u: "Pa", v: 101325 }, // unknown metric
      { n: "temp", u: "Cel", v: 85, t: 1 }, // DS18B20-style power-on value: a sensor error code
      { n: "battery", u: "V", v: 3.71 },
    ]);
    const res = await post(body, { authorization: bearer(probe), "content-type": SENML });
    expect(res.status).toBe(202);
    const a = (await res.json()) as Answer;
    expect(a).toMatchObject({ stored: 3, duplicates: 0, rejected: 2 });
    expect(a.rejections.map((r) => r.code).sort()).toEqual(["sensor-error", "unknown-metric"]);
    const stored = await c.query(`select metric::text, value from readings where probe_id = $1 and ts = to_timestamp($2) order by metric`, [id, t]);
    expect(stored.rows).toEqual([
      { metric: "battery-voltage", value: 3.71 },
      { metric: "moisture", value: 77 },
      { metric: "temperature", value: 22.5 },
    ]);
    const rejected = (await rejectionsOf(id)).filter((r) => r.source === "http");
    // One row for the message: its two refused records counted, each reason on a line of its own.
    expect(rejected).toHaveLength(1);
    expect(rejected[0]!.records).toBe(2);
    expect(
      rejected[0]!.reason
        .split("\n")
        .map((l) => l.split(":")[0])
        .sort(),
    ).toEqual(["sensor-error", "unknown-metric"]);
    expect(rejected[0]!.excerpt).toContain("urn:dev:wormward:");
    const p = await c.query(`select battery_v, last_seen_at from probes where id = $1`, [id]);
    expect(p.rows[0].battery_v).toBeCloseTo(3.71, 5);
    expect(Date.now() - new Date(p.rows[0].last_seen_at).getTime()).toBeLessThan(60_000);
  });

  it("a SenML time outside the date range is one refused record and the rest of the pack is stored", async () => {
    // Was a 500 with nothing stored: "Invalid time value" from a Date past ECMA-262 §21.4.1.22's range.
    const probe = farm.probes[6]!;
    const t = nowS() - 20;
    const body = JSON.stringify([
      { bn: `urn:dev:wormward:${probe.code}:`, bt: t, n: "temp", u: "Cel", v: 21 },
      { n: "temp", u: "Cel", v: 22, t: 1e13 },
      { bt: 1e300, n: "moisture", u: "/100", v: 70 },
      { bt: t, n: "moisture", u: "/100", v: 71 },
    ]);
    const res = await post(body, { authorization: bearer(probe), "content-type": SENML });
    expect(res.status).toBe(202);
    const a = (await res.json()) as Answer;
    expect(a).toMatchObject({ stored: 2, rejected: 2 });
    expect(a.rejections.map((r) => r.code)).toEqual(["too-far-ahead", "too-far-ahead"]);
    expect(await rowsOf(probe.id)).toBe(2);
    const rows = await rejectionsOf(probe.id);
    expect(rows.map((r) => [r.records, r.reason.split("\n").length])).toEqual([[2, 2]]);
  });

  it("a pack of 8,190 bad records writes one rejection row with its count", async () => {
    const probe = farm.probes[7]!;
    const body = `[${Array(8190).fill(1).join(",")}]`; // RFC 8428 §5: a record is a JSON object
    const res = await post(body, { authorization: bearer(probe), "content-type": SENML });
    expect(res.status).toBe(202);
    const a = (await res.json()) as Answer;
    expect(a).toMatchObject({ stored: 0, rejected: 8190 });
    expect(a.rejections).toHaveLength(20); // the answer names the first 20, not all 8,190
    const rows = await rejectionsOf(probe.id);
    expect(rows).toHaveLength(1);
    expect(rows[0]!.records).toBe(8190);
    expect(rows[0]!.reason.split("\n")).toHaveLength(6);
    expect(rows[0]!.reason.length).toBeLessThan(1500);
  });

  it("a repeated post is stored once", async () => {
    const probe = farm.probes[1]!;
    const body = pack(probe.code, nowS() - 30);
    const first = (await (await post(body, { authorization: bearer(probe), "content-type": SENML })).json()) as Answer;
    const again = await post(body, { authorization: bearer(probe), "content-type": SENML });
    expect(again.status).toBe(202);
    const second = (await again.json()) as Answer;
    expect(first).toMatchObject({ stored: 2, duplicates: 0 });
    expect(second).toMatchObject({ stored: 0, duplicates: 2, rejected: 0 });
    expect(await rowsOf(probe.id)).toBe(2);
    const rollup = await c.query(`select sum(count)::int as n from reading_rollups where probe_id = $1`, [probe.id]);
    expect(rollup.rows[0].n).toBe(2);
  });

  it("the code:token form of the bearer credential is accepted too", async () => {
    const probe = farm.probes[2]!;
    const res = await post(pack(probe.code, nowS()), { authorization: `Bearer ${probe.code}:${probe.token}`, "content-type": SENML });
    expect(res.status).toBe(202);
    expect(await rowsOf(probe.id)).toBe(2);
  });

  it("a body that is not JSON, or not a SenML pack, gets 400 with the reason, and the refusal is recorded", async () => {
    const probe = farm.probes[3]!;
    const notJson = await post("{temp: 21", { authorization: bearer(probe), "content-type": SENML });
    expect(notJson.status).toBe(400);
    expect(((await notJson.json()) as ErrorBody).error).toMatchObject({ code: "bad_request", message: expect.stringMatching(/not UTF-8 JSON/) });
    const notPack = await post(JSON.stringify({ n: "temp", v: 21 }), { authorization: bearer(probe), "content-type": SENML });
    expect(notPack.status).toBe(400);
    // RFC 8428 §5: a pack is an array of records
    expect(((await notPack.json()) as ErrorBody).error.message).toMatch(/JSON array of records/);
    expect(await rowsOf(probe.id)).toBe(0);
    expect((await rejectionsOf(probe.id)).map((r) => r.reason.split(":")[0])).toEqual(["malformed-json", "malformed-senml"]);
  });

  it("missing or wrong credentials get 401 with a Bearer challenge and store nothing", async () => {
    const probe = farm.probes[4]!;
    const other = farm.probes[5]!;
    const body = pack(probe.code, nowS());
    const none = await post(body, { "content-type": SENML });
    expect(none.status).toBe(401);
    // RFC 6750 §3: the challenge names the scheme; invalid_token once credentials were sent
    expect(none.headers.get("www-authenticate")).toBe('Bearer realm="wormward"');
    expect(((await none.json()) as ErrorBody).error.message).toMatch(/Authorization: Bearer/);
    for (const authorization of [
      `Bearer ${probe.code}.wrong-token`,
      bearer({ code: probe.code, token: other.token }),
      `Basic ${Buffer.from(`${probe.code}:${probe.token}`).toString("base64")}`,
      `Bearer ${probe.token}`,
    ]) {
      const res = await post(body, { authorization, "content-type": SENML });
      expect(res.status, authorization).toBe(401);
      expect(res.headers.get("www-authenticate")).toBe('Bearer realm="wormward", error="invalid_token"');
      expect(((await res.json()) as ErrorBody).error).toMatchObject({ code: "unauthenticated", message: expect.stringMatching(/code or token is wrong/) });
    }
    expect(await rowsOf(probe.id)).toBe(0);
    // A known code with a wrong token is noted for that probe's page, once a minute at most.
    const noted = await c.query<{ source: string }>(`select source from rejected_messages where probe_id = $1 and reason like 'wrong-token%'`, [probe.id]);
    expect(noted.rows.map((r) => r.source)).toEqual(["http"]);
  });

  it("a probe cannot post readings named for another probe", async () => {
    const [probe, other] = [farm.probes[4]!, farm.probes[5]!];
    const res = await post(pack(other.code, nowS()), { authorization: bearer(probe), "content-type": SENML });
    expect(res.status).toBe(202);
    const a = (await res.json()) as Answer;
    expect(a).toMatchObject({ stored: 0, rejected: 2 });
    expect(a.rejections.every((r) => r.code === "wrong-probe")).toBe(true);
    expect(await rowsOf(other.id)).toBe(0);
  });

  it("a body over 16 KiB gets 413 whether its length is declared or streamed, and nothing is stored", async () => {
    const probe = farm.probes[5]!;
    const records = Array.from({ length: 400 }, (_, i) => ({ n: "temp", u: "Cel", v: 20 + i / 1000, t: -i }));
    const big = JSON.stringify([{ bn: `urn:dev:wormward:${probe.code}:`, bt: nowS() }, ...records]);
    expect(Buffer.byteLength(big)).toBeGreaterThan(16 * 1024);
    const declared = await post(big, { authorization: bearer(probe), "content-type": SENML });
    expect(declared.status).toBe(413);
    expect(((await declared.json()) as ErrorBody).error).toMatchObject({ code: "too_large", message: expect.stringMatching(/at most 16384 bytes/) });

    // Chunked transfer coding: no Content-Length, so the cap applies while reading.
    const bytes = new TextEncoder().encode(big);
    const stream = new ReadableStream<Uint8Array>({
      start(ctrl) {
        for (let i = 0; i < bytes.length; i += 4096) ctrl.enqueue(bytes.slice(i, i + 4096));
        ctrl.close();
      },
    });
    const streamed = await post(stream, { authorization: bearer(probe), "content-type": SENML }, { duplex: "half" } as RequestInit);
    expect(streamed.status).toBe(413);
    expect(await rowsOf(probe.id)).toBe(0);
    expect((await rejectionsOf(probe.id)).filter((r) => r.reason.startsWith("too-large")).length).toBe(2);
  });

  it("a body that is not application/senml+json gets 415 naming the type to use", async () => {
    const probe = farm.probes[0]!;
    for (const type of ["application/json", "text/plain"]) {
      const res = await post(pack(probe.code, nowS()), { authorization: bearer(probe), "content-type": type });
      expect(res.status, type).toBe(415);
      // RFC 8428 §6 registers application/senml+json
      expect(((await res.json()) as ErrorBody).error).toMatchObject({ code: "unsupported_media", message: expect.stringContaining("application/senml+json") });
    }
    const gz = await post(pack(probe.code, nowS()), { authorization: bearer(probe), "content-type": SENML, "content-encoding": "gzip" });
    expect(gz.status).toBe(415);
    const ok = await post(pack(probe.code, nowS()), { authorization: bearer(probe), "content-type": "Application/SenML+JSON; charset=utf-8" });
    expect(ok.status).toBe(202);
  });
});
