// In-process bulk of the SenML fuzzing: what the MQTT ingest does with a payload before its writer
// (ingest/service.ts onReadings: validateSenmlPayload, then summarizeRejections for the stored row).
// The same payloads over a real broker and into PostgreSQL: senml-mqtt.test.ts.
import fc from "fast-check";
import assert from "node:assert/strict";
import { afterAll, describe, it } from "vitest";
import { DEFAULT_LIMITS, summarizeRejections, validateSenmlPayload, type RejectCode, type TelemetryProbe, type ValidatedPayload } from "@/lib/domain/telemetry";
import { METRICS } from "@/lib/domain/metrics";
import { count, hostileText, hostileValue, nastyString, printTally, runs } from "./hostile";
import { buildPack, clockFrom, expectedOutcome, mixedPack, wholeBad } from "./senml-packs";

const probe: TelemetryProbe = { id: 7, code: "p-fuzz", calibration: null };
const NOW = new Date("2026-03-01T12:00:00Z");
const CODES: RejectCode[] = [
  "too-large",
  "malformed-json",
  "malformed-senml",
  "unknown-metric",
  "bad-unit",
  "wrong-probe",
  "out-of-range",
  "sensor-error",
  "too-far-ahead",
  "too-old",
  "bad-presence",
  "retained",
];
// What a stored reason or an answer must not carry: NUL (PostgreSQL text cannot hold it), other
// controls but the line break between reasons, lone surrogates, and bidirectional controls, which
// would turn the rest of the line around on the probe's page (Unicode UAX #9).
const UNREADABLE = /[\u0000-\u0009\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069\u200e\u200f\u061c]|\p{Cs}/u;

/** What every validation must give, whatever it was sent: readings fit to store, rejections with words.
 * node:assert rather than expect in the hot loop: thousands of cases a second. */
function checkAnswer(v: ValidatedPayload) {
  for (const r of v.readings) {
    const range = METRICS[r.metric].range!;
    assert.ok(Number.isFinite(r.value) && r.value >= range.min && r.value <= range.max, `reading out of range: ${JSON.stringify(r)}`);
    assert.ok(Math.abs(r.ts.getTime() - NOW.getTime()) <= DEFAULT_LIMITS.maxAgeMs, `reading time out of the window: ${r.ts.getTime()}`);
  }
  for (const r of v.rejections) {
    assert.ok(CODES.includes(r.code), `unknown code ${r.code}`);
    assert.ok(r.reason.trim().length > 5, `no words: ${JSON.stringify(r)}`);
  }
  const stored = summarizeRejections(v.rejections);
  if (v.rejections.length === 0) assert.equal(stored, null);
  else {
    assert.equal(stored!.records, v.rejections.length);
    assert.doesNotMatch(stored!.reason, UNREADABLE);
  }
}

const senmlish = fc.dictionary(
  fc.oneof(fc.constantFrom("bn", "bt", "bu", "bv", "bs", "bver", "n", "u", "v", "vs", "vb", "vd", "s", "t", "ut"), fc.string({ maxLength: 4 })),
  fc.oneof(hostileValue, nastyString()),
  { maxKeys: 6 },
);

describe("SenML payloads (MQTT ingest, in process)", () => {
  it("any bytes, text or JSON get readings fit to store or rejections with reasons, never a throw", () => {
    fc.assert(
      fc.property(
        fc.oneof(
          hostileText,
          fc.array(fc.oneof(senmlish, hostileValue), { maxLength: 12 }).map((a) => JSON.stringify(a)),
          fc.array(senmlish, { minLength: 1, maxLength: 8 }).map((a) => JSON.stringify([{ bn: "urn:dev:wormward:p-fuzz:", bt: NOW.getTime() / 1000 }, ...a])),
        ),
        (payload) => {
          count("senml-mqtt in process");
          const buf = typeof payload === "string" ? Buffer.from(payload, "utf8") : Buffer.from(payload);
          const v = validateSenmlPayload(probe, buf, { now: NOW });
          checkAnswer(v);
          if (v.readings.length === 0 && v.rejections.length === 0) {
            // Nothing stored and nothing refused: only a pack of base records or firmware text may say nothing.
            assert.ok(Array.isArray(JSON.parse(buf.toString("utf8").replace(/^\ufeff/, ""))));
          }
        },
      ),
      runs(5_000, 1),
    );
  });

  it("a mixed pack stores exactly its good records and refuses each bad one with a reason", () => {
    fc.assert(
      fc.property(mixedPack(), fc.boolean(), (spec, bom) => {
        count("senml-mqtt in process");
        const clock = clockFrom(Math.floor(NOW.getTime() / 1000));
        const pack = buildPack(probe.code, spec, clock);
        const text = JSON.stringify(pack.json);
        // A UTF-8 byte-order mark is read past (WHATWG Encoding, UTF-8 decode).
        const payload = Buffer.from(bom ? `\ufeff${text}` : text, "utf8");
        const v = validateSenmlPayload(probe, payload, { now: NOW });
        checkAnswer(v);
        const want = expectedOutcome(payload, pack, DEFAULT_LIMITS.maxBytes);
        assert.equal(v.rejections.length, want.refused, v.rejections.map((r) => r.reason).join("\n"));
        if (want.stored === pack.good.length) {
          assert.deepEqual(
            v.readings.map((r) => r.value).sort((a, b) => a - b),
            pack.good.map((g) => g.stored).sort((a, b) => a - b),
          );
          assert.ok(!v.rejections.some((r) => r.whole));
        } else assert.equal(v.readings.length, 0);
      }),
      runs(4_000, 2),
    );
  });

  it("a message that cannot be read as a pack is refused whole with one reason", () => {
    fc.assert(
      fc.property(wholeBad, ({ payload }) => {
        count("senml-mqtt in process");
        const v = validateSenmlPayload(probe, payload, { now: NOW });
        checkAnswer(v);
        assert.equal(v.readings.length, 0);
        assert.equal(v.rejections.length, 1);
        assert.equal(v.rejections[0]!.whole, true);
      }),
      runs(1_000, 3),
    );
  });

  it("a payload over the cap is refused for its size before it is read", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4096 }), mixedPack(4), (extra, spec) => {
        count("senml-mqtt in process");
        const text = JSON.stringify(buildPack(probe.code, spec, clockFrom(NOW.getTime() / 1000)).json);
        const v = validateSenmlPayload(probe, Buffer.from(text.padEnd(DEFAULT_LIMITS.maxBytes + extra, " ")), { now: NOW });
        checkAnswer(v);
        assert.equal(v.readings.length, 0);
        assert.deepEqual(
          v.rejections.map((r) => r.code),
          ["too-large"],
        );
      }),
      runs(200, 4),
    );
  });
});

afterAll(() => printTally("senml-validate"));
