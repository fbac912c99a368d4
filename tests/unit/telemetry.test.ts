import { describe, expect, it } from "vitest";
import { probeBaseName } from "@/lib/domain/metrics";
import { refusalFaults } from "@/lib/domain/rules";
import {
  DEFAULT_LIMITS,
  REASON_LINE_MAX,
  REASONS_KEPT,
  excerptOf,
  summarizeRejections,
  validateSenmlPayload,
  type RejectCode,
  type TelemetryProbe,
} from "@/lib/domain/telemetry";

const NOW = new Date("2026-03-01T12:00:00Z");
const T = NOW.getTime() / 1000;
const probe: TelemetryProbe = { id: 7, code: "p-7f3a", calibration: null };
const bn = probeBaseName(probe.code);

const validate = (pack: unknown, p: TelemetryProbe = probe, limits = {}) =>
  validateSenmlPayload(p, typeof pack === "string" ? pack : JSON.stringify(pack), { now: NOW, limits });
const codes = (r: { rejections: { code: RejectCode }[] }) => r.rejections.map((x) => x.code);
const rows = (r: ReturnType<typeof validate>) => r.readings.map((x) => [x.metric, x.ts.getTime() / 1000, x.value]);

describe("validateSenmlPayload", () => {
  it("turns a probe's pack into stored readings, in stored units, and probe status", () => {
    const r = validate([
      { bn, bt: T - 60, n: "temp", u: "K", v: 297.65 },
      { n: "moisture", u: "/", v: 0.78 },
      { n: "nh3", u: "ppm", v: 3.2 },
      { n: "battery", u: "mV", v: 3710 },
      { n: "rssi", u: "dBm", v: -67 },
      { n: "fw", vs: "ww-0.5.0" },
    ]);
    expect(r.rejections).toEqual([]);
    expect(r.readings.every((x) => x.probeId === 7)).toBe(true);
    const got = rows(r);
    expect(got.map(([m, t]) => [m, t])).toEqual([
      ["temperature", T - 60],
      ["moisture", T - 60],
      ["ammonia", T - 60],
      ["battery-voltage", T - 60],
      ["signal", T - 60],
    ]);
    expect(got[0]![2]).toBeCloseTo(24.5, 9); // 297.65 K − 273.15
    expect(got[1]![2]).toBeCloseTo(78, 9); // "/" is a ratio: × 100 for percent
    expect(got[3]![2]).toBeCloseTo(3.71, 9);
    expect(r.status).toEqual({ seenAt: NOW, batteryV: 3.71, signalDbm: -67, firmware: "ww-0.5.0" });
  });

  it("resolves relative times against the given now (RFC 8428 §4.5.3)", () => {
    const r = validate([{ bn, n: "temp", u: "Cel", v: 20, t: -30 }]);
    expect(rows(r)).toEqual([["temperature", T - 30, 20]]);
  });

  it("refuses a payload over 16 KiB before reading it, and accepts one of exactly 16 KiB", () => {
    const pack = JSON.stringify([{ bn, bt: T, n: "temp", u: "Cel", v: 20 }]);
    const at = pack + " ".repeat(DEFAULT_LIMITS.maxBytes - pack.length);
    expect(Buffer.byteLength(at)).toBe(16_384);
    expect(validate(at).readings).toHaveLength(1);
    const over = validate(at + " ");
    expect(codes(over)).toEqual(["too-large"]);
    expect(over.rejections[0]!.reason).toMatch(/16385 bytes/);
    expect(over.readings).toEqual([]);
  });

  it("refuses malformed JSON and bytes that are not UTF-8", () => {
    expect(codes(validate('[{"bn":'))).toEqual(["malformed-json"]);
    expect(codes(validateSenmlPayload(probe, Buffer.from([0x5b, 0xff, 0x5d]), { now: NOW }))).toEqual(["malformed-json"]);
  });

  it("refuses a pack that is not SenML, and keeps good records beside a malformed one", () => {
    expect(codes(validate({ bn, v: 1 }))).toEqual(["malformed-senml"]);
    expect(codes(validate([]))).toEqual(["malformed-senml"]);
    const r = validate([
      { bn, bt: T, n: "temp", u: "Cel", v: 20 },
      { n: "temp", u: "Cel", v: "21" }, // RFC 8428 §5 Table 2: v is a number
      { n: "temp", u: "Cel", v: 22, t: 1 },
    ]);
    expect(codes(r)).toEqual(["malformed-senml"]);
    expect(r.rejections[0]!.reason).toMatch(/^record 1:/);
    expect(rows(r)).toEqual([
      ["temperature", T, 20],
      ["temperature", T + 1, 22],
    ]);
  });

  it("names each refused record's reason and stores the rest", () => {
    const r = validate([
      { bn, bt: T, n: "temp", u: "Cel", v: 21 },
      { n: "ph", v: 7 },
      { n: "moisture", u: "%", v: 0.8 },
      { n: "temp", u: "Cel", v: 130, t: -1 },
      { n: "temp", u: "Cel", v: 85, t: -2 },
      { n: "temp", u: "Cel", v: -127, t: -3 },
      { n: "temp", u: "Cel", v: 20, t: 5 * 60 + 1 },
      { n: "temp", u: "Cel", v: 20, t: -(30 * 86_400 + 1) },
      { bn: probeBaseName("someone-else"), n: "temp", u: "Cel", v: 20 },
    ]);
    expect(codes(r).sort()).toEqual(
      ["bad-unit", "out-of-range", "sensor-error", "sensor-error", "too-far-ahead", "too-old", "unknown-metric", "wrong-probe"].sort(),
    );
    expect(r.rejections.find((x) => x.code === "bad-unit")!.reason).toMatch(/RFC 8428 §12\.1/);
    expect(rows(r)).toEqual([["temperature", T, 21]]);
  });

  it("a time outside JavaScript's date range is one refused record and the rest of the pack is kept", () => {
    // ECMA-262 §21.4.1.22: a Date spans ±8.64e15 ms; 1e13 s and 1e300 s are far past it.
    const r = validate([
      { bn, bt: T, n: "temp", u: "Cel", v: 21 },
      { n: "temp", u: "Cel", v: 22, t: 1e13 },
      { bt: 1e300, n: "moisture", u: "/100", v: 70 },
      { bt: -1e300, n: "moisture", u: "/100", v: 71 }, // RFC 8428 §4.5.3: below 2**28, so relative to now
      { bt: T, n: "nh3", u: "ppm", v: 3 },
    ]);
    expect(codes(r).sort()).toEqual(["too-far-ahead", "too-far-ahead", "too-old"]);
    expect(r.rejections.map((x) => x.reason)).toEqual(
      expect.arrayContaining([expect.stringMatching(/temp at t=\d{14} s is more than 5 min ahead/), expect.stringMatching(/moisture at t=1e\+300 s/)]),
    );
    expect(rows(r)).toEqual([
      ["temperature", T, 21],
      ["ammonia", T, 3],
    ]);
  });

  it("a time just inside the date range reads as a date in the refusal", () => {
    const r = validate([{ bn, bt: 8.64e12, n: "temp", u: "Cel", v: 21 }]);
    expect(r.rejections[0]!.reason).toMatch(/at \+275760-09-13T00:00:00\.000Z is more than/);
  });

  it("a value that adds up to Infinity is refused, not stored", () => {
    // RFC 8428 §4.5.4: bv and v add; two large finite numbers overflow.
    const r = validate([
      { bn, bt: T, n: "temp", u: "Cel", v: 20 },
      { bv: 1.5e308, n: "moisture-raw", v: 1.5e308 },
    ]);
    expect(codes(r)).toEqual(["out-of-range"]);
    expect(r.rejections[0]!.reason).toMatch(/Infinity/);
    expect(rows(r)).toEqual([["temperature", T, 20]]);
  });

  it("accepts the edges of the time window and of the physical range", () => {
    const r = validate([
      { bn, bt: T, n: "temp", u: "Cel", v: 125, t: 5 * 60 },
      { n: "temp", u: "Cel", v: -55, t: -30 * 86_400 },
    ]);
    expect(r.rejections).toEqual([]);
    expect(r.readings).toHaveLength(2);
  });

  it("takes its time window from the limits given", () => {
    const pack = [{ bn, bt: T, n: "temp", u: "Cel", v: 20, t: -3600 }];
    expect(codes(validate(pack, probe, { maxAgeMs: 1800_000 }))).toEqual(["too-old"]);
    expect(codes(validate([{ ...pack[0], t: 120 }], probe, { maxAheadMs: 60_000 }))).toEqual(["too-far-ahead"]);
    expect(codes(validate(pack, probe, { maxBytes: 10 }))).toEqual(["too-large"]);
  });

  it("calibrates a raw moisture count with the probe's line and keeps the raw count too", () => {
    // a worked example of our own, recomputed independently: θ = −0.0025·raw + 1.35, raw 450 → 0.225, i.e. 22.5 %
    const calibrated = { ...probe, calibration: { slope: -0.25, intercept: 135 } };
    const r = validate([{ bn, bt: T, n: "moisture-raw", u: "count", v: 450 }], calibrated);
    expect(r.rejections).toEqual([]);
    expect(rows(r)[0]).toEqual(["moisture-raw", T, 450]);
    expect(rows(r)[1]![0]).toBe("moisture");
    expect(rows(r)[1]![2]).toBeCloseTo(22.5, 9);
  });

  it("stores only the raw count of an uncalibrated probe, and prefers a probe's own moisture value", () => {
    expect(rows(validate([{ bn, bt: T, n: "moisture-raw", v: 450 }]))).toEqual([["moisture-raw", T, 450]]);
    const calibrated = { ...probe, calibration: { slope: -0.25, intercept: 135 } };
    const both = validate(
      [
        { bn, bt: T, n: "moisture-raw", v: 450 },
        { n: "moisture", u: "/100", v: 70 },
      ],
      calibrated,
    );
    expect(rows(both).sort()).toEqual([
      ["moisture", T, 70],
      ["moisture-raw", T, 450],
    ]);
  });

  it("keeps a battery charge level as a reading but only volts on the probe row", () => {
    const r = validate([{ bn, bt: T, n: "battery", u: "%EL", v: 64 }]);
    expect(rows(r)).toEqual([["battery-level", T, 64]]);
    expect(r.status.batteryV).toBeUndefined();
  });

  it("takes the latest status value by record time, not by position", () => {
    const r = validate([
      { bn, bt: T, n: "battery", u: "V", v: 3.6 },
      { n: "battery", u: "V", v: 3.9, t: -60 },
    ]);
    expect(r.status.batteryV).toBe(3.6);
  });

  it("refuses a firmware string with control characters", () => {
    const r = validate([{ bn, bt: T, n: "fw", vs: "a\u0000b" }]);
    expect(codes(r)).toEqual(["out-of-range"]);
    expect(r.status.firmware).toBeUndefined();
  });

  it("makes an excerpt of the first bytes without NUL", () => {
    expect(excerptOf(Buffer.from("ab\u0000cd"), 4)).toBe("ab\uFFFDc");
    expect(excerptOf("x".repeat(500))).toHaveLength(200);
  });
});

describe("summarizeRejections", () => {
  it("a pack of 8,190 bad records is one summary with its count and the first few reasons", () => {
    const recs = [{ bn, bt: T, n: "temp", u: "Cel", v: 200 }, ...Array.from({ length: 8189 }, () => ({ n: "temp", u: "Cel", v: 200 }))];
    const r = validate(recs, probe, { maxBytes: 1 << 20 });
    expect(r.rejections).toHaveLength(8190);
    const s = summarizeRejections(r.rejections)!;
    expect(s.records).toBe(8190);
    const lines = s.reason.split("\n");
    expect(lines).toHaveLength(REASONS_KEPT + 1);
    expect(lines[0]).toMatch(/^out-of-range: urn:dev:wormward:p-7f3a:temp = 200 °C/);
    expect(lines[REASONS_KEPT]).toBe(`and ${8190 - REASONS_KEPT} more records refused`);
    expect(s.reason.length).toBeLessThan((REASON_LINE_MAX + 1) * (REASONS_KEPT + 1));
  });

  it("keeps the first refusal of each kind and channel before repeats, so each faulty channel stays readable", () => {
    const pack = [
      { bn, bt: T, n: "temp", u: "Cel", v: 200 },
      ...Array.from({ length: 10 }, (_, k) => ({ n: "temp", u: "Cel", v: 200, t: -k - 1 })),
      { n: "moisture", u: "/100", v: 140 },
      { n: "temp", u: "Cel", v: 85 },
    ];
    const s = summarizeRejections(validate(pack).rejections)!;
    expect(s.records).toBe(13);
    expect(
      refusalFaults(s.reason)
        .map((f) => [f.suffix, f.cause])
        .sort(),
    ).toEqual(
      [
        ["moisture", "out-of-range"],
        ["temp", "error-code"],
        ["temp", "out-of-range"],
        ["temp", "out-of-range"],
        ["temp", "out-of-range"],
      ].sort(),
    );
  });

  it("clips a long reason and says nothing for a message with no refusals", () => {
    const long = "x".repeat(5000);
    const s = summarizeRejections([{ code: "unknown-metric", reason: long }])!;
    expect(s).toMatchObject({ records: 1 });
    expect(s.reason).toHaveLength(REASON_LINE_MAX);
    expect(s.reason.endsWith("…")).toBe(true);
    expect(summarizeRejections([])).toBeNull();
  });
});
