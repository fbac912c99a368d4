import { describe, expect, it } from "vitest";
import { METRICS, METRIC_KEYS, metricFromSenml, probeBaseName, readingFromRecord } from "@/lib/domain/metrics";
import { parseSenml } from "@/lib/domain/senml";

const NOW = 1_750_000_000;
const base = probeBaseName("p-7f3a");

function readingsOf(pack: unknown) {
  const parsed = parseSenml(pack, { now: NOW });
  if (!parsed.ok) throw new Error(parsed.reason);
  return parsed.records.map(readingFromRecord);
}

describe("probe names", () => {
  it("a probe's pack resolves to one reading per metric", () => {
    const results = readingsOf([
      { bn: base, bt: NOW - 60, n: "temp", u: "Cel", v: 24.5 },
      { n: "moisture", u: "/100", v: 78 },
      { n: "moisture-raw", v: 412 },
      { n: "nh3", u: "ppm", v: 3.2 },
      { n: "battery", u: "V", v: 3.71 },
      { n: "rssi", u: "dBm", v: -67 },
      { n: "fw", vs: "1.4.2" },
    ]);
    expect(results.every((r) => r.ok)).toBe(true);
    const readings = results.flatMap((r) => (r.ok ? [r.reading] : []));
    expect(readings.map((r) => [r.metric, r.value ?? r.text])).toEqual([
      ["temperature", 24.5],
      ["moisture", 78],
      ["moisture-raw", 412],
      ["ammonia", 3.2],
      ["battery-voltage", 3.71],
      ["signal", -67],
      ["firmware", "1.4.2"],
    ]);
    expect(new Set(readings.map((r) => r.probeId))).toEqual(new Set(["p-7f3a"]));
    expect(readings.every((r) => r.time === NOW - 60)).toBe(true);
  });

  it("every metric's name is a valid SenML name under the probe's base name", () => {
    // RFC 8428 §4.5.1 charset
    for (const key of METRIC_KEYS) expect(`${base}${METRICS[key].suffix}`).toMatch(/^[A-Za-z0-9][A-Za-z0-9\-:./_]*$/);
  });

  it("refuses names outside the scheme", () => {
    expect(metricFromSenml("urn:dev:ow:10e2073a01080063", "Cel").ok).toBe(false);
    expect(metricFromSenml(`${base}humidity`, "%RH")).toMatchObject({ ok: false });
    expect(metricFromSenml("urn:dev:wormward:temp", "Cel").ok).toBe(false);
  });
});

describe("units", () => {
  const one = (suffix: string, u: string | undefined, v: number) => {
    const [r] = readingsOf([{ bn: base, n: suffix, ...(u === undefined ? {} : { u }), v }]);
    return r!;
  };

  it("a record without a unit takes the metric's own unit", () => {
    // RFC 8428 §4.5.2: units then come from the application context
    expect(one("temp", undefined, 21)).toMatchObject({ ok: true, reading: { value: 21 } });
  });

  it("converts kelvin, ratios, millivolts and dBW to stored units", () => {
    expect(one("temp", "K", 300)).toMatchObject({ reading: { value: expect.closeTo(26.85, 9) } });
    expect(one("moisture", "/", 0.78)).toMatchObject({ reading: { value: expect.closeTo(78, 9) } });
    // RFC 8798: ppm is 1e-6 of "/"
    expect(one("nh3", "/", 4e-6)).toMatchObject({ reading: { value: expect.closeTo(4, 9) } });
    // RFC 8798: mV is 1/1000 V
    expect(one("battery", "mV", 3700)).toMatchObject({ reading: { metric: "battery-voltage", value: expect.closeTo(3.7, 9) } });
    // RFC 8798 worked example: 10 dBm = -20 dBW
    const dbw = metricFromSenml(`${base}rssi`, "dBW");
    expect(dbw.ok && dbw.match.rule && -20 * dbw.match.rule.scale + dbw.match.rule.offset).toBe(10);
    expect(one("rssi", "dBW", -97)).toMatchObject({ reading: { value: -67 } });
  });

  it("tells battery voltage from remaining charge by the unit", () => {
    // RFC 8428 Table 6: %EL is remaining battery energy level in percent
    expect(one("battery", "%EL", 64)).toMatchObject({ ok: true, reading: { metric: "battery-level", value: 64 } });
    expect(one("battery", undefined, 64)).toMatchObject({ ok: false });
  });

  it("refuses '%' for moisture because SenML's '%' is a ratio", () => {
    // RFC 8428 §12.1 Note 2: "%" is NOT a percentage but the absolute ratio
    const r = one("moisture", "%", 78);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/Note 2/);
    expect(one("moisture", "%RH", 78).ok).toBe(false);
  });

  it("ignores a base unit inherited by the firmware string", () => {
    const [, fw] = readingsOf([
      { bn: base, bu: "Cel", n: "temp", v: 20 },
      { n: "fw", vs: "2.0.0" },
    ]);
    expect(fw).toMatchObject({ ok: true, reading: { metric: "firmware", text: "2.0.0" } });
  });
});

describe("faulty readings", () => {
  const temp = (v: number) => readingFromRecord({ name: `${base}temp`, unit: "Cel", value: v, time: NOW });

  it("refuses the error codes of DS18B20-style sensors", () => {
    // typical sensor datasheet and libraries, from memory: 85 °C power-on value, -127 °C disconnected
    expect(temp(85)).toMatchObject({ ok: false });
    expect(temp(-127)).toMatchObject({ ok: false });
    expect(temp(84.9)).toMatchObject({ ok: true });
  });

  it("refuses values outside what the sensor can measure", () => {
    expect(temp(126)).toMatchObject({ ok: false });
    expect(readingFromRecord({ name: `${base}moisture`, value: 101, time: NOW })).toMatchObject({ ok: false });
    expect(readingFromRecord({ name: `${base}moisture`, value: -0.5, time: NOW })).toMatchObject({ ok: false });
    expect(readingFromRecord({ name: `${base}rssi`, unit: "dBm", value: 5, time: NOW })).toMatchObject({ ok: false });
  });

  it("refuses a value of the wrong kind", () => {
    expect(readingFromRecord({ name: `${base}temp`, unit: "Cel", stringValue: "hot", time: NOW })).toMatchObject({ ok: false });
    expect(readingFromRecord({ name: `${base}fw`, value: 1, time: NOW })).toMatchObject({ ok: false });
    expect(readingFromRecord({ name: `${base}fw`, stringValue: "x".repeat(65), time: NOW })).toMatchObject({ ok: false });
  });
});
