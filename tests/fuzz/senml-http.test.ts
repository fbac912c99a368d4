// SenML over HTTP (POST /api/ingest), three ways:
// 1. in process, no database (the bulk): the route's own readers (lib/web/probe-auth.ts bearer,
//    lib/web/api/senml-body.ts media type and cap) and the validation, with the status the route gives;
// 2. in process, the real route handler (app/api/ingest/route.ts) over this worker's PostgreSQL;
// 3. over the network, the built app started by the test harness, into its database.
import assert from "node:assert/strict";
import pg from "pg";
import { sql } from "drizzle-orm";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { db } from "@/db";
import { POST } from "@/app/api/ingest/route";
import { DEFAULT_LIMITS, validateSenmlPayload } from "@/lib/domain/telemetry";
import { parseProbeBearer } from "@/lib/web/probe-auth";
import { readSenmlBody, SENML_JSON } from "@/lib/web/api/senml-body";
import { errorBody } from "@/lib/web/errors";
import { appUrl } from "../helpers/app";
import { createProbes, type TestProbe } from "../integration/ingest/helpers";
import { makeFarm } from "../integration/series/fixtures";
import { count, expectClearError, hostileText, nastyString, printTally, runs } from "./hostile";
import { buildPack, clockFrom, expectedOutcome, mixedPack, wholeBad, type BuiltPack, type Clock, type PackSpec } from "./senml-packs";

type Probe = { code: string; token: string };
type Answer = { stored: number; duplicates: number; rejected: number; rejections: { code: string; reason: string }[] };

/** One request as a probe (or anything else) might send it, and what the route must answer. */
type Case = { headers: [string, string][]; body: Buffer; want: { status: number; stored?: number; refused: number } };

const credential = fc.oneof(
  { weight: 8, arbitrary: fc.constant("good") },
  {
    weight: 2,
    arbitrary: fc.oneof(
      fc.constantFrom("none", "wrong token", "Basic dXNlcjpwYXNz", "Bearer", "Bearer .", "Bearer :", "bearer  x.y", "Bearer a.b c"),
      nastyString(20).map((s) => `Bearer ${s}`),
    ),
  },
);
const mediaType = fc.oneof(
  { weight: 8, arbitrary: fc.constantFrom(SENML_JSON, `${SENML_JSON}; charset=utf-8`, "APPLICATION/SENML+JSON") },
  { weight: 1, arbitrary: fc.constantFrom("application/json", "text/plain", "", "application/senml+cbor", "multipart/form-data; boundary=x") },
);
const encoding = fc.oneof({ weight: 9, arbitrary: fc.constant(null) }, { weight: 1, arbitrary: fc.constantFrom("gzip", "br", "identity", " IDENTITY ") });
const body = fc.oneof(
  { weight: 6, arbitrary: mixedPack().map((spec): Parts["body"] => ({ spec, raw: null })) },
  { weight: 2, arbitrary: wholeBad.map((w): Parts["body"] => ({ spec: null, raw: w.payload })) },
  { weight: 1, arbitrary: hostileText.map((t): Parts["body"] => ({ spec: null, raw: Buffer.from(t) })) },
  {
    weight: 1,
    arbitrary: fc.integer({ min: 1, max: 40_000 }).map((n): Parts["body"] => ({ spec: null, raw: Buffer.alloc(DEFAULT_LIMITS.maxBytes + n, 0x20) })),
  },
);

/** Builds the request and says what the route answers: 401, 415, 413, 400 (refused whole) or 202. */
type Parts = { cred: string; type: string; coding: string | null; body: { spec: PackSpec | null; raw: Buffer | null } };
function makeCase(probe: Probe, clock: Clock, parts: Parts): Case {
  let pack: BuiltPack | null = null;
  const payload = parts.body.spec ? Buffer.from(JSON.stringify((pack = buildPack(probe.code, parts.body.spec, clock)).json)) : parts.body.raw!;
  const headers: [string, string][] = [];
  const auth =
    parts.cred === "good" ? `Bearer ${probe.code}.${probe.token}` : parts.cred === "wrong token" ? `Bearer ${probe.code}.wrong${probe.token}` : parts.cred;
  if (parts.cred !== "none") headers.push(["authorization", auth]);
  if (parts.type) headers.push(["content-type", parts.type]);
  if (parts.coding) headers.push(["content-encoding", parts.coding]);
  const goodType = parts.type.split(";")[0]!.trim().toLowerCase() === SENML_JSON;
  const goodCoding = !parts.coding || parts.coding.trim().toLowerCase() === "identity";
  const signed = parts.cred === "good";
  let want: Case["want"];
  if (!signed) want = { status: 401, refused: 0 };
  else if (!goodType || !goodCoding) want = { status: 415, refused: 0 };
  else if (payload.length > DEFAULT_LIMITS.maxBytes) want = { status: 413, refused: 1 };
  else {
    const out = expectedOutcome(payload, pack, DEFAULT_LIMITS.maxBytes);
    // A message refused whole is a 400; a pack whose every record is refused is still a 202 that says so.
    want = pack ? { status: 202, stored: out.stored, refused: out.refused } : { status: 0, refused: 1 };
  }
  return { headers, body: payload, want };
}

const parts = fc.record({ cred: credential, type: mediaType, coding: encoding, body });
const headerSafe = (headers: [string, string][]) => {
  try {
    new Headers(headers);
    return true;
  } catch {
    return false; // no client can send it (RFC 9110 §5.5: no CR, LF or NUL; fetch: ByteString)
  }
};

// A wrong token is noted for the probe's page too (lib/server/probes/record-door-refusal.ts); the
// totals below count what the messages themselves were refused for.

/** The route's answer to one case: 202 with counts, or the error envelope with words. */
async function checkAnswer(res: Response, c: Case, context: string) {
  const text = await res.text();
  const json = JSON.parse(text) as unknown;
  if (c.want.status === 0) {
    // Unknown until validated: a message that cannot be read is 400; otherwise 202 with counts.
    assert.ok(res.status === 400 || res.status === 202, `${context}: ${res.status} ${text}`);
  } else assert.equal(res.status, c.want.status, `${context}: ${text}`);
  if (res.status === 202) {
    const a = json as Answer;
    if (c.want.stored !== undefined) {
      assert.equal(a.stored, c.want.stored, `${context}: ${text}`);
      assert.equal(a.rejected, c.want.refused, `${context}: ${text}`);
    }
    for (const r of a.rejections) assert.ok(r.reason.length > 5);
    return { stored: a.stored, refused: a.rejected };
  }
  expectClearError(res.status, json, `${context}: ${text}`);
  if (res.status === 400) expect((json as { error: { message: string } }).error.message).toMatch(/^Nothing stored: /);
  return { stored: 0, refused: res.status === 400 || res.status === 413 ? 1 : 0 };
}

describe("SenML over HTTP, in process without a database", () => {
  it("the route's readers and validation answer every request with 202 and counts or a clear 4xx", async () => {
    const probe = { code: "p-fuzz.1", token: "tok_en-123" };
    const clock = clockFrom(Math.floor(Date.now() / 1000));
    await fc.assert(
      fc.asyncProperty(parts, async (p) => {
        const c = makeCase(probe, clock, p);
        if (!headerSafe(c.headers)) return;
        count("senml-http in process");
        const req = new Request("http://127.0.0.1/api/ingest", { method: "POST", headers: c.headers, body: new Uint8Array(c.body) });
        // The route: who (the bearer), then the body, then the validation (app/api/ingest/route.ts).
        const cred = parseProbeBearer(req.headers.get("authorization"));
        const signed = cred !== null && cred.code === probe.code && cred.token === probe.token;
        if (!signed) return assert.equal(c.want.status, 401);
        let status: number;
        let answer: unknown;
        try {
          const posted = await readSenmlBody(req);
          if ("tooLarge" in posted) {
            status = 413;
            answer = { error: { code: "too_large", message: posted.tooLarge } };
          } else {
            const v = validateSenmlPayload({ id: 1, code: probe.code }, posted.bytes);
            const whole = v.readings.length === 0 && v.rejections.some((r) => r.whole);
            status = whole ? 400 : 202;
            answer = whole
              ? { error: { code: "bad_request", message: `Nothing stored: ${v.rejections[0]!.reason}.` } }
              : { stored: v.readings.length, duplicates: 0, rejected: v.rejections.length, rejections: v.rejections };
          }
        } catch (err) {
          ({ status, body: answer } = errorBody(err));
        }
        await checkAnswer(Response.json(answer, { status }), c, JSON.stringify(c.headers));
      }),
      runs(10_600, 21),
    );
  });
});

describe("SenML over HTTP, the real route handler in process", () => {
  let probe: TestProbe;
  beforeAll(async () => {
    probe = (await createProbes(1))[0]!;
  });

  it("every request gets its answer, and the readings stored are exactly the good records", async () => {
    const clock = clockFrom(Math.floor(Date.now() / 1000));
    const total = { stored: 0, refused: 0 };
    await fc.assert(
      fc.asyncProperty(parts, async (p) => {
        const c = makeCase(probe, clock, p);
        if (!headerSafe(c.headers)) return;
        count("senml-http in process");
        const res = await POST(new Request("http://127.0.0.1/api/ingest", { method: "POST", headers: c.headers, body: new Uint8Array(c.body) }), {});
        const got = await checkAnswer(res, c, JSON.stringify(c.headers));
        total.stored += got.stored;
        total.refused += got.refused;
      }),
      runs(300, 22),
    );
    const r = await db().execute<{ stored: number; refused: number }>(sql`
      select (select count(*)::int from readings where probe_id = ${probe.id}) as stored,
             (select coalesce(sum(records), 0)::int from rejected_messages where probe_id = ${probe.id} and reason not like 'wrong-token:%') as refused`);
    expect(r.rows[0]).toEqual(total);
  });
});

describe("SenML over HTTP, through the network to the running app", () => {
  let c: pg.Client;
  let probe: { id: number; code: string; token: string };
  beforeAll(async () => {
    c = new pg.Client({ connectionString: inject("appDbUrl") });
    await c.connect();
    probe = (await makeFarm(c, { zones: ["working"] })).probes[0]!;
  });
  afterAll(async () => {
    await c?.end();
    printTally("senml-http");
  });

  it("every request gets its answer, the readings stored are exactly the good records, and the app still answers", async () => {
    const clock = clockFrom(Math.floor(Date.now() / 1000));
    const total = { stored: 0, refused: 0 };
    await fc.assert(
      fc.asyncProperty(parts, async (p) => {
        const kase = makeCase(probe, clock, p);
        if (!headerSafe(kase.headers)) return;
        count("senml-http over the network");
        const res = await fetch(`${appUrl()}/api/ingest`, { method: "POST", headers: kase.headers, body: new Uint8Array(kase.body) });
        const got = await checkAnswer(res, kase, JSON.stringify(kase.headers));
        total.stored += got.stored;
        total.refused += got.refused;
      }),
      runs(120, 23),
    );
    const r = await c.query(
      `select (select count(*)::int from readings where probe_id = $1) as stored,
              (select coalesce(sum(records), 0)::int from rejected_messages where probe_id = $1 and reason not like 'wrong-token:%') as refused`,
      [probe.id],
    );
    expect(r.rows[0]).toEqual(total);
    expect((await fetch(`${appUrl()}/sign-in`)).status).toBe(200);
  });
});
