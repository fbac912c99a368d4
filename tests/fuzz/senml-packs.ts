// Mixed SenML packs whose good and bad records are known by construction, for the MQTT and HTTP
// fuzzers alike: a good record must be stored, each bad one refused with its reason, and a message
// that cannot be read at all refused whole.
import fc from "fast-check";
import { probeBaseName } from "@/lib/domain/metrics";
import { edgeNumber, hostileValue, nastyString, nestedJson } from "./hostile";

/** Where a record's time comes from: a fresh second per record, so no two good ones collide. */
export type Clock = { now: number; next: () => number };
export const clockFrom = (now: number): Clock => {
  let k = 0;
  return { now, next: () => now - 1 - k++ };
};

type Good = { good: true; suffix: string; unit?: string; value: number; stored: number };
type Bad = { good: false; why: string; make: (name: (s: string) => string, t: number, clock: Clock) => unknown };
export type RecordSpec = Good | Bad;

// Values inside each metric's range (lib/domain/metrics.ts), away from the error codes 85 and -127 °C.
// Tiny magnitudes too: PostgreSQL's real (float4) cannot hold 1e-300, a double can.
const TINY = [5e-324, 1e-300, 1e-45, 1e-40, 1.1754943508222875e-38];
const inRange = (min: number, max: number) =>
  fc
    .oneof(
      { weight: 9, arbitrary: fc.double({ min, max, noNaN: true, noDefaultInfinity: true }) },
      { weight: 1, arbitrary: fc.constantFrom(...TINY.flatMap((t) => [t, -t])).filter((v) => v >= min && v <= max) },
    )
    .filter((v) => !Object.is(v, -0));
export const goodRecord: fc.Arbitrary<Good> = fc.oneof(
  inRange(-55, 84).map((v) => ({ good: true as const, suffix: "temp", unit: "Cel", value: v, stored: v })),
  inRange(-55, 84).map((v) => ({ good: true as const, suffix: "temp", value: v, stored: v })),
  inRange(0, 100).map((v) => ({ good: true as const, suffix: "moisture", unit: "/100", value: v, stored: v })),
  inRange(0, 1000).map((v) => ({ good: true as const, suffix: "nh3", unit: "ppm", value: v, stored: v })),
  inRange(0, 15).map((v) => ({ good: true as const, suffix: "battery", unit: "V", value: v, stored: v })),
  inRange(0, 100).map((v) => ({ good: true as const, suffix: "battery", unit: "%EL", value: v, stored: v })),
  inRange(-150, 0).map((v) => ({ good: true as const, suffix: "rssi", unit: "dBm", value: v, stored: v })),
  fc.integer({ min: 0, max: 65_535 }).map((v) => ({ good: true as const, suffix: "moisture-raw", value: v, stored: v })),
);

// Printed by its words in a counterexample, not as the source of `make`.
const bad = (why: string, make: Bad["make"]): Bad => ({ good: false, why, make, [fc.toStringMethod]: () => `bad(${why})` }) as Bad;
/** Records each refused on its own (one rejection, no reading), whatever else the pack holds. */
export const badRecord: fc.Arbitrary<Bad> = fc.oneof(
  fc.constantFrom("ph", "pressure", "", "temp:x", "TEMP").map((m) => bad("unknown metric", (n, t) => ({ n: n(m), v: 7, t }))),
  fc
    .oneof(fc.double({ min: 125.0001, max: 1e308, noNaN: true }), fc.double({ min: -1e308, max: -55.0001, noNaN: true }))
    .filter((v) => v !== -127)
    .map((v) => bad("out of range", (n, t) => ({ n: n("temp"), u: "Cel", v, t }))),
  fc.constantFrom(85, -127).map((v) => bad("sensor error code", (n, t) => ({ n: n("temp"), u: "Cel", v, t }))),
  fc.constantFrom("%", "F", "degC", "cel", "Cel\u0000").map((u) => bad("unit", (n, t) => ({ n: n("temp"), u, v: 20, t }))),
  hostileValue.filter((v) => typeof v !== "number").map((v) => bad("value of the wrong type", (n, t) => ({ n: n("moisture"), u: "/100", v, t }))),
  fc.integer({ min: 1_000, max: 10_000_000 }).map((ahead) => bad("too far ahead", (n, _t, c) => ({ n: n("nh3"), u: "ppm", v: 3, t: c.now + ahead }))),
  fc.integer({ min: 31 * 86_400, max: 1_500_000_000 }).map((age) => bad("too old", (n, _t, c) => ({ n: n("rssi"), u: "dBm", v: -70, t: c.now - age }))),
  fc.constantFrom(42, null, "x", [], true, [{ n: "temp" }]).map((r) => bad("not an object", () => r)),
  fc.constantFrom("zz_", "_", "v_").map((k) => bad("mandatory field", (n, t) => ({ n: n("temp"), u: "Cel", v: 20, t, [k]: 1 }))),
  fc
    .constantFrom("\u202e", "\u0000", " ", "\u2066", "é", "\n", "\ud800")
    .map((ch) => bad("name with a forbidden character", (n, t) => ({ n: n(`te${ch}mp`), u: "Cel", v: 20, t }))),
  fc.constant(bad("two values", (n, t) => ({ n: n("temp"), u: "Cel", v: 20, vs: "20", t }))),
  nastyString(80)
    .filter((s) => s.length > 64 || /[\u0000-\u001f]/.test(s))
    .map((vs) => bad("firmware text", (n, t) => ({ n: n("fw"), vs, t }))),
  fc.constant(bad("text for a number", (n, t) => ({ n: n("moisture"), vs: "wet", t }))),
  fc.constant(bad("no value", (n, t) => ({ n: n("temp"), u: "Cel", t }))),
  hostileValue.filter((v) => typeof v !== "number").map((v) => bad("time of the wrong type", (n) => ({ n: n("temp"), u: "Cel", v: 20, t: v }))),
  fc.double({ max: -1e-9, noNaN: true, noDefaultInfinity: true }).map((ut) => bad("negative ut", (n, t) => ({ n: n("temp"), u: "Cel", v: 20, t, ut }))),
  fc.integer({ min: 1, max: 300 }).map((d) => bad("deep nesting", (n, t) => ({ n: n("temp"), u: "Cel", v: JSON.parse(nestedJson(d)) as unknown, t }))),
  fc.constantFrom({}, { foo: 1 }, { "": null }).map((r) => bad("no name and no value", () => r)),
  // Written with full names, another probe's own name; after a base name, a name that is no metric.
  fc.constant(
    bad("a name of another probe", (n, t) => ({
      n: n("temp") === "temp" ? "someone-else:temp" : n("temp").replace(/:[^:]+:temp$/, ":someone-else:temp"),
      u: "Cel",
      v: 20,
      t,
    })),
  ),
);

/** A pack written with full names and absolute times, or after one base record (bn, bt) with suffixes and relative times. */
export type PackSpec = { based: boolean; records: RecordSpec[] };
export const mixedPack = (maxRecords = 24): fc.Arbitrary<PackSpec> =>
  fc.record({
    based: fc.boolean(),
    records: fc.array(fc.oneof({ weight: 3, arbitrary: goodRecord }, { weight: 2, arbitrary: badRecord }), { minLength: 1, maxLength: maxRecords }),
  });

export type BuiltPack = { json: unknown[]; good: Good[]; bad: number };

export function buildPack(code: string, spec: PackSpec, clock: Clock): BuiltPack {
  const base = probeBaseName(code);
  // "Another probe" in a based pack changes the name after the base, which is then an unknown metric.
  const name = (s: string) => (spec.based ? s : `${base}${s}`);
  const json: unknown[] = spec.based ? [{ bn: base, bt: clock.now }] : [];
  const good: Good[] = [];
  let badCount = 0;
  for (const r of spec.records) {
    const t = clock.next();
    const time = spec.based ? t - clock.now : t;
    if (r.good) {
      json.push({ n: name(r.suffix), ...(r.unit ? { u: r.unit } : {}), v: r.value, t: time });
      good.push(r);
    } else {
      const rec = r.make(name, time, spec.based ? { ...clock, now: 0 } : clock);
      json.push(rec);
      badCount++;
    }
  }
  return { json, good, bad: badCount };
}

/** Messages refused whole: one rejection, nothing stored. */
export const wholeBad: fc.Arbitrary<{ why: string; payload: Buffer }> = fc.oneof(
  fc.uint8Array({ minLength: 1, maxLength: 60 }).map((b) => ({ why: "not UTF-8", payload: Buffer.concat([Buffer.from([0xff]), Buffer.from(b)]) })),
  fc.jsonValue().map((v) => ({ why: "UTF-16 with a byte-order mark", payload: Buffer.from(`\ufeff${JSON.stringify([v])}`, "utf16le") })),
  fc.jsonValue().map((v) => ({ why: "cut short", payload: Buffer.from(JSON.stringify([v]).slice(0, -1)) })),
  fc
    .dictionary(fc.string({ maxLength: 6 }), fc.jsonValue({ maxDepth: 1 }))
    .map((o) => ({ why: "an object, not a pack", payload: Buffer.from(JSON.stringify(o)) })),
  fc.oneof(fc.constant("[]"), fc.constant("null"), fc.constant('"x"'), edgeNumber.map(String)).map((s) => ({ why: "no records", payload: Buffer.from(s) })),
  fc.constantFrom("[\u0000]", '[{"n":"a"}\u0000]', "\u0000").map((s) => ({ why: "NUL outside a string", payload: Buffer.from(s) })),
  fc.integer({ min: 11, max: 1e6 }).map((v) => ({ why: "a newer SenML version", payload: Buffer.from(JSON.stringify([{ bver: v, n: "x", v: 1 }])) })),
  fc.constantFrom(0, -1, 1.5, "10", null).map((v) => ({ why: "a bad version", payload: Buffer.from(JSON.stringify([{ bver: v, n: "x", v: 1 }])) })),
);

/** What storing one message must come to: good readings stored and refused records counted (a
 * message over the size cap, like one that cannot be read, is one refusal and stores nothing). */
export function expectedOutcome(payload: Buffer, pack: BuiltPack | null, maxBytes: number): { stored: number; refused: number } {
  if (!pack || payload.length > maxBytes) return { stored: 0, refused: 1 };
  return { stored: pack.good.length, refused: pack.bad };
}
