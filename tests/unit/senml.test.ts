import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { RELATIVE_TIME_LIMIT, parseSenml, type ResolvedRecord, type SenmlParseResult } from "@/lib/domain/senml";

const NOW = 1_750_000_000.5;

function records(r: SenmlParseResult): ResolvedRecord[] {
  if (!r.ok) throw new Error(`pack refused: ${r.reason}`);
  expect(r.errors).toEqual([]);
  return r.records;
}

function expectRecords(actual: ResolvedRecord[], expected: ResolvedRecord[]) {
  expect(actual).toHaveLength(expected.length);
  expected.forEach((e, i) => {
    const { time, ...rest } = e;
    const { time: actualTime, ...actualRest } = actual[i]!;
    expect(actualRest).toEqual(rest);
    expect(actualTime).toBeCloseTo(time, 6);
  });
}

describe("RFC 8428 examples", () => {
  it("single data point, time 'now'", () => {
    // RFC 8428 §5.1.1
    const pack = `[
      {"n":"urn:dev:ow:10e2073a01080063","u":"Cel","v":23.1}
    ]`;
    expectRecords(records(parseSenml(pack, { now: NOW })), [{ name: "urn:dev:ow:10e2073a01080063", unit: "Cel", value: 23.1, time: NOW }]);
  });

  it("multiple data points with a base name", () => {
    // RFC 8428 §5.1.2, first example
    const pack = `[
      {"bn":"urn:dev:ow:10e2073a01080063:","n":"voltage","u":"V","v":120.1},
      {"n":"current","u":"A","v":1.2}
    ]`;
    expectRecords(records(parseSenml(pack, { now: NOW })), [
      { name: "urn:dev:ow:10e2073a01080063:voltage", unit: "V", value: 120.1, time: NOW },
      { name: "urn:dev:ow:10e2073a01080063:current", unit: "A", value: 1.2, time: NOW },
    ]);
  });

  it("base time, base unit and relative times, version 5", () => {
    // RFC 8428 §5.1.2, second example: current at Tue Jun 8 18:01:16.001 UTC 2010 and each second
    // for the previous 5 seconds. Resolved: bt + t (§4.5.3), bu where u is absent (§4.5.2),
    // chronological order (§4.6), and the version on every record since it is not 10 (§4.6).
    const pack = `[
      {"bn":"urn:dev:ow:10e2073a0108006:","bt":1.276020076001e+09,
       "bu":"A","bver":5,
       "n":"voltage","u":"V","v":120.1},
      {"n":"current","t":-5,"v":1.2},
      {"n":"current","t":-4,"v":1.3},
      {"n":"current","t":-3,"v":1.4},
      {"n":"current","t":-2,"v":1.5},
      {"n":"current","t":-1,"v":1.6},
      {"n":"current","v":1.7}
    ]`;
    const bt = 1276020076.001;
    expect(Date.UTC(2010, 5, 8, 18, 1, 16, 1) / 1000).toBeCloseTo(bt, 6);
    const current = (v: number, t: number): ResolvedRecord => ({ name: "urn:dev:ow:10e2073a0108006:current", unit: "A", value: v, time: bt + t, version: 5 });
    expectRecords(records(parseSenml(pack, { now: NOW })), [
      current(1.2, -5),
      current(1.3, -4),
      current(1.4, -3),
      current(1.5, -2),
      current(1.6, -1),
      { name: "urn:dev:ow:10e2073a0108006:voltage", unit: "V", value: 120.1, time: bt, version: 5 },
      current(1.7, 0),
    ]);
  });

  it("SensML stream example: relative offsets after a base time", () => {
    // RFC 8428 §5.1.2, streaming example (the first nine records, which the RFC shows before "...")
    const pack = `[
      {"bn":"urn:dev:ow:10e2073a01080063","bt":1.320067464e+09,"bu":"%RH","v":21.2},
      {"t":10,"v":21.3},{"t":20,"v":21.4},{"t":30,"v":21.4},{"t":40,"v":21.5},
      {"t":50,"v":21.5},{"t":60,"v":21.5},{"t":70,"v":21.6},{"t":80,"v":21.7}
    ]`;
    const rs = records(parseSenml(pack, { now: NOW }));
    expect(rs.map((r) => r.time - 1320067464)).toEqual([0, 10, 20, 30, 40, 50, 60, 70, 80]);
    expect(rs.map((r) => r.value)).toEqual([21.2, 21.3, 21.4, 21.4, 21.5, 21.5, 21.5, 21.6, 21.7]);
    expect(new Set(rs.map((r) => `${r.name} ${r.unit}`))).toEqual(new Set(["urn:dev:ow:10e2073a01080063 %RH"]));
  });

  it("multiple measurements resolve to the records §5.1.4 lists", () => {
    // RFC 8428 §5.1.3 input, §5.1.4 "Resolved Data" output
    const pack = `[
      {"bn":"urn:dev:ow:10e2073a01080063","bt":1.320067464e+09,
       "bu":"%RH","v":20},
      {"u":"lon","v":24.30621},
      {"u":"lat","v":60.07965},
      {"t":60,"v":20.3},
      {"u":"lon","t":60,"v":24.30622},
      {"u":"lat","t":60,"v":60.07965},
      {"t":120,"v":20.7},
      {"u":"lon","t":120,"v":24.30623},
      {"u":"lat","t":120,"v":60.07966},
      {"u":"%EL","t":150,"v":98},
      {"t":180,"v":21.2},
      {"u":"lon","t":180,"v":24.30628},
      {"u":"lat","t":180,"v":60.07967}
    ]`;
    const resolved = `[
      {"n":"urn:dev:ow:10e2073a01080063","u":"%RH","t":1.320067464e+09,
       "v":20},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lon","t":1.320067464e+09,
       "v":24.30621},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lat","t":1.320067464e+09,
       "v":60.07965},
      {"n":"urn:dev:ow:10e2073a01080063","u":"%RH","t":1.320067524e+09,
       "v":20.3},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lon","t":1.320067524e+09,
       "v":24.30622},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lat","t":1.320067524e+09,
       "v":60.07965},
      {"n":"urn:dev:ow:10e2073a01080063","u":"%RH","t":1.320067584e+09,
       "v":20.7},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lon","t":1.320067584e+09,
       "v":24.30623},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lat","t":1.320067584e+09,
       "v":60.07966},
      {"n":"urn:dev:ow:10e2073a01080063","u":"%EL","t":1.320067614e+09,
       "v":98},
      {"n":"urn:dev:ow:10e2073a01080063","u":"%RH","t":1.320067644e+09,
       "v":21.2},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lon","t":1.320067644e+09,
       "v":24.30628},
      {"n":"urn:dev:ow:10e2073a01080063","u":"lat","t":1.320067644e+09,
       "v":60.07967}
    ]`;
    const expected = (JSON.parse(resolved) as { n: string; u: string; t: number; v: number }[]).map((r): ResolvedRecord => ({
      name: r.n,
      unit: r.u,
      time: r.t,
      value: r.v,
    }));
    expect(records(parseSenml(pack, { now: NOW }))).toEqual(expected);
    // a resolved pack is a fixed point (§4.6: no base values, no relative times)
    expect(records(parseSenml(resolved, { now: NOW }))).toEqual(expected);
  });

  it("multiple data types", () => {
    // RFC 8428 §5.1.5
    const pack = `[
      {"bn":"urn:dev:ow:10e2073a01080063:","n":"temp","u":"Cel","v":23.1},
      {"n":"label","vs":"Machine Room"},
      {"n":"open","vb":false},
      {"n":"nfv-reader","vd":"aGkgCg"}
    ]`;
    expectRecords(records(parseSenml(pack, { now: NOW })), [
      { name: "urn:dev:ow:10e2073a01080063:temp", unit: "Cel", value: 23.1, time: NOW },
      { name: "urn:dev:ow:10e2073a01080063:label", stringValue: "Machine Room", time: NOW },
      { name: "urn:dev:ow:10e2073a01080063:open", boolValue: false, time: NOW },
      { name: "urn:dev:ow:10e2073a01080063:nfv-reader", dataValue: "aGkgCg", time: NOW },
    ]);
  });

  it("collection of resources: later base name, earlier base time", () => {
    // RFC 8428 §5.1.6: "the last record would use the Base Name from the 3rd record but the Base
    // Time from the first record"; names hold "/" (§4.5.1)
    const pack = `[
      {"bn":"2001:db8::2/","bt":1.320078429e+09,
       "n":"temperature","u":"Cel","v":25.2},
      {"n":"humidity","u":"%RH","v":30},
      {"bn":"2001:db8::1/","n":"temperature","u":"Cel","v":12.3},
      {"n":"humidity","u":"%RH","v":67}
    ]`;
    const t = 1320078429;
    expectRecords(records(parseSenml(pack, { now: NOW })), [
      { name: "2001:db8::2/temperature", unit: "Cel", value: 25.2, time: t },
      { name: "2001:db8::2/humidity", unit: "%RH", value: 30, time: t },
      { name: "2001:db8::1/temperature", unit: "Cel", value: 12.3, time: t },
      { name: "2001:db8::1/humidity", unit: "%RH", value: 67, time: t },
    ]);
  });

  it("setting an actuator: a record that only sets the base name", () => {
    // RFC 8428 §5.1.7, first example
    const pack = `[
      {"bn":"urn:dev:ow:10e2073a01080063:"},
      {"n":"temp","u":"Cel","v":23.1},
      {"n":"heat","u":"/","v":1},
      {"n":"fan","u":"/","v":0}
    ]`;
    expectRecords(records(parseSenml(pack, { now: NOW })), [
      { name: "urn:dev:ow:10e2073a01080063:temp", unit: "Cel", value: 23.1, time: NOW },
      { name: "urn:dev:ow:10e2073a01080063:heat", unit: "/", value: 1, time: NOW },
      { name: "urn:dev:ow:10e2073a01080063:fan", unit: "/", value: 0, time: NOW },
    ]);
  });

  it("lights dimmed now and switched off 100 ms later", () => {
    // RFC 8428 §5.1.7, third example: t 0.1 after an absolute base time stays absolute
    const pack = `[
      {"bt":1.320078429e+09,"bu":"/","n":"2001:db8::3","v":0.5},
      {"n":"2001:db8::4","v":0.5},
      {"n":"2001:db8::3","t":0.1,"v":0},
      {"n":"2001:db8::4","t":0.1,"v":0}
    ]`;
    const rs = records(parseSenml(pack, { now: NOW }));
    expect(rs.map((r) => [r.name, r.value, r.unit])).toEqual([
      ["2001:db8::3", 0.5, "/"],
      ["2001:db8::4", 0.5, "/"],
      ["2001:db8::3", 0, "/"],
      ["2001:db8::4", 0, "/"],
    ]);
    expect(rs[2]!.time).toBeCloseTo(1320078429.1, 6);
  });
});

describe("resolution rules", () => {
  it("times below 2**28 are relative to now; 2**28 itself is absolute", () => {
    // RFC 8428 §4.5.3
    const pack = [
      { n: "a", v: 1, t: -60 },
      { n: "b", v: 1, t: RELATIVE_TIME_LIMIT - 1 },
      { n: "c", v: 1, t: RELATIVE_TIME_LIMIT },
    ];
    const rs = records(parseSenml(pack, { now: NOW }));
    const byName = Object.fromEntries(rs.map((r) => [r.name, r.time]));
    expect(byName.a).toBe(NOW - 60);
    expect(byName.b).toBe(NOW + RELATIVE_TIME_LIMIT - 1);
    expect(byName.c).toBe(RELATIVE_TIME_LIMIT);
  });

  it("the sum of base time and time decides relative or absolute", () => {
    // RFC 8428 §4.5.3: "Time and Base Time are added together"
    const rs = records(
      parseSenml(
        [
          { bt: -120, n: "x", t: 30, v: 1 },
          { n: "y", t: 2 ** 28 + 200, v: 1 },
        ],
        { now: NOW },
      ),
    );
    // chronological order (§4.6) puts the 1978 absolute time first
    expect(rs.map((r) => [r.name, r.time])).toEqual([
      ["y", 2 ** 28 + 80],
      ["x", NOW - 90],
    ]);
  });

  it("base value and base sum add to value and sum", () => {
    // RFC 8428 §4.5.4
    const rs = records(parseSenml([{ bn: "m", bv: 100, bs: 10, v: 1.5, t: 2e9 }, { t: 2e9 + 1, v: -2, s: 5 }, { t: 2e9 + 2 }], { now: NOW }));
    expect(rs.map((r) => [r.value, r.sum])).toEqual([
      [101.5, 10],
      [98, 15],
      [100, 10],
    ]);
  });

  it("a sum alone is a valid record without value", () => {
    // RFC 8428 §4.2: Value is optional if a Sum value is present
    const rs = records(parseSenml([{ n: "meter", u: "W", s: 42, t: 2e9 }], { now: NOW }));
    expect(rs).toEqual([{ name: "meter", unit: "W", sum: 42, time: 2e9 }]);
  });

  it("keeps the record's unit over the base unit and omits an absent one", () => {
    // RFC 8428 §4.5.2
    const rs = records(
      parseSenml(
        [
          { n: "a", v: 1 },
          { bu: "V", n: "b", v: 1 },
          { n: "c", u: "A", v: 1 },
        ],
        { now: NOW },
      ),
    );
    expect(rs.map((r) => r.unit)).toEqual([undefined, "V", "A"]);
    expect("unit" in rs[0]!).toBe(false);
  });

  it("reads bytes as UTF-8 and accepts an already parsed pack", () => {
    const bytes = new TextEncoder().encode('[{"n":"a","v":1}]');
    expect(records(parseSenml(bytes, { now: NOW }))).toEqual([{ name: "a", value: 1, time: NOW }]);
    expect(records(parseSenml([{ n: "a", v: 1 }], { now: NOW }))).toEqual([{ name: "a", value: 1, time: NOW }]);
  });

  it("ignores unknown fields that do not end in '_'", () => {
    // RFC 8428 §4.4
    expect(records(parseSenml([{ n: "a", v: 1, foo: "bar" }], { now: NOW }))).toHaveLength(1);
  });

  it("uses the clock when no 'now' is given", () => {
    const before = Date.now() / 1000;
    const [r] = records(parseSenml([{ n: "a", v: 1 }]));
    expect(r!.time).toBeGreaterThanOrEqual(before);
    expect(r!.time).toBeLessThanOrEqual(Date.now() / 1000);
  });
});

describe("bad records are reported, good ones kept", () => {
  const refused = (pack: unknown) => {
    const r = parseSenml(pack, { now: NOW });
    if (!r.ok) throw new Error(`pack refused whole: ${r.reason}`);
    return r;
  };

  it.each([
    ["a name starting with '-'", { n: "-temp", v: 1 }, /§4\.5\.1/], // RFC 8428 §4.5.1
    ["a name with a space", { n: "bin 1", v: 1 }, /§4\.5\.1/], // RFC 8428 §4.5.1
    ["no name at all", { v: 1 }, /§4\.5\.1/], // RFC 8428 §4.5.1
    ["two value fields", { n: "a", v: 1, vs: "x" }, /§4\.2/], // RFC 8428 §4.2: exactly one
    ["no value and no sum", { n: "a", t: 5 }, /§4\.2/], // RFC 8428 §4.2
    ["a mandatory unknown field", { n: "a", v: 1, crit_: 1 }, /§4\.4/], // RFC 8428 §4.4
    ["a string where a number belongs", { n: "a", v: "1" }, /Table 2/], // RFC 8428 §5 Table 2
    ["a boolean as a string", { n: "a", vb: "true" }, /Table 2/], // RFC 8428 §5 Table 2
    ["padded base64 data", { n: "a", vd: "aGkgCg==" }, /base64url/], // RFC 8428 §4.3 Table 1 note
    ["a negative update time", { n: "a", v: 1, ut: -1 }, /ut/], // RFC 8428 §4.2
    ["an empty object", {}, /§4\.2/], // RFC 8428 §4.2
    ["a number instead of a record", 42, /object/], // RFC 8428 §5
    ["a base time and time adding up past the largest number", { n: "a", v: 1, bt: 1e308, t: 1e308 }, /§4\.5\.3/], // RFC 8428 §4.5.3
  ])("%s", (_label, bad, reason) => {
    const r = refused([{ n: "good", v: 1 }, bad, { n: "also-good", v: 2 }]);
    expect(r.records.map((x) => x.name)).toEqual(["good", "also-good"]);
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0]!.index).toBe(1);
    expect(r.errors[0]!.reason).toMatch(reason);
  });

  it("refuses records that inherit a bad base name, until a good one", () => {
    const r = refused([
      { bn: 7, n: "a", v: 1 },
      { n: "b", v: 1 },
      { bn: "ok:", n: "c", v: 1 },
    ]);
    expect(r.records.map((x) => x.name)).toEqual(["ok:c"]);
    expect(r.errors.map((e) => e.index)).toEqual([0, 1]);
    expect(r.errors[1]!.reason).toMatch(/record 0/);
  });

  it("a time far outside any calendar is still a record: the ingest, not the parser, judges its date", () => {
    // RFC 8428 §4.5.3: bt and t are seconds, with no upper bound in the RFC itself
    const r = refused([
      { n: "a", v: 1, t: 1e13 },
      { n: "b", v: 1, bt: 1e300 },
    ]);
    expect(r.errors).toEqual([]);
    expect(r.records.map((x) => [x.name, x.time])).toEqual([
      ["a", 1e13],
      ["b", 1e300],
    ]);
  });

  it("a bad base unit only matters to records without their own unit", () => {
    const r = refused([
      { bu: 3, n: "a", u: "V", v: 1 },
      { n: "b", u: "A", v: 1 },
      { n: "c", v: 1 },
    ]);
    expect(r.records.map((x) => x.name)).toEqual(["b"]);
    expect(r.errors.map((e) => e.index)).toEqual([0, 2]);
  });
});

describe("packs refused whole", () => {
  it.each([
    ["not JSON", "[{", /JSON/],
    ["not an array", '{"n":"a","v":1}', /array/],
    ["an empty array", "[]", /no records/], // RFC 8428 §11 CDDL: SenML-Pack = [1* record]
    ["a newer version", '[{"bver":11,"n":"a","v":1}]', /§4\.4/], // RFC 8428 §4.4: MUST NOT use
    ["versions that differ", '[{"bver":5,"n":"a","v":1},{"bver":6,"n":"b","v":1}]', /§4\.4/], // RFC 8428 §4.4
    ["a default version then another", '[{"n":"a","v":1},{"bver":5,"n":"b","v":1}]', /§4\.4/], // RFC 8428 §4.4
    ["a version that is not a positive integer", '[{"bver":1.5,"n":"a","v":1}]', /§4\.1/], // RFC 8428 §4.1
  ])("%s", (_label, input, reason) => {
    const r = parseSenml(input, { now: NOW });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(reason);
  });

  it("refuses bytes that are not UTF-8", () => {
    // RFC 8428 §5: only the UTF-8 form of JSON is allowed
    expect(parseSenml(new Uint8Array([0x5b, 0xff, 0x5d]))).toMatchObject({ ok: false });
  });

  it("refuses a pack over the size limit", () => {
    const pack = Array.from({ length: 11 }, (_, i) => ({ n: `a${i}`, v: i }));
    expect(parseSenml(pack, { maxRecords: 10 })).toMatchObject({ ok: false });
  });

  it("never throws, whatever arrives", () => {
    fc.assert(
      fc.property(fc.oneof(fc.json(), fc.string(), fc.jsonValue()), (input) => {
        const r = parseSenml(input, { now: NOW });
        if (r.ok) for (const rec of r.records) expect(Number.isFinite(rec.time)).toBe(true);
        else expect(r.reason.length).toBeGreaterThan(0);
      }),
    );
  });
});
