// Shared pieces of the fuzz suite: fixed seeds, hostile values and the checks every answer must pass.
// fast-check prints the seed and the shrunk counterexample on failure; FUZZ_SEED=<n> reruns with another seed.
import fc from "fast-check";
import { expect } from "vitest";

const BASE_SEED = process.env.FUZZ_SEED ? Number(process.env.FUZZ_SEED) : 20_261_203;

/** Options for fc.assert: a fixed seed per property (told apart by `salt`) and a run count. */
export function runs(numRuns: number, salt: number): fc.Parameters<unknown> {
  return { numRuns, seed: BASE_SEED + salt };
}

/** Counts the cases each class runs, printed after each file so the report can quote them. */
export const tally = new Map<string, number>();
export const count = (what: string, n = 1) => tally.set(what, (tally.get(what) ?? 0) + n);
export const printTally = (file: string) => console.log(`[fuzz] ${file}: ${[...tally].map(([k, v]) => `${k} ${v}`).join(", ")}`);

// Characters that break things: NUL and other controls, bidirectional overrides and isolates (Unicode
// UAX #9 §2: U+202A–U+202E, U+2066–U+2069, plus the marks U+200E, U+200F, U+061C), lone surrogates,
// a byte-order mark, a zero-width joiner, a replacement character, astral and combining characters.
export const NASTY_CHARS = [
  "\u0000",
  "\u0001",
  "\u001b",
  "\u007f",
  "\u0085",
  "\u202e",
  "\u202d",
  "\u202a",
  "\u2066",
  "\u2067",
  "\u2069",
  "\u200e",
  "\u200f",
  "\u061c",
  "\ud800",
  "\udfff",
  "\ufeff",
  "\u200d",
  "\ufffd",
  "😀",
  "e\u0301",
  "\n",
  "\r",
  "\t",
  '"',
  "\\",
  ",",
  ";",
] as const;

/** A string mixing ordinary text with the characters above. */
export const nastyString = (maxLength = 40) =>
  fc
    .array(fc.oneof({ weight: 3, arbitrary: fc.string({ maxLength: 6 }) }, { weight: 2, arbitrary: fc.constantFrom(...NASTY_CHARS) }), { maxLength })
    .map((parts) => parts.join(""));

/** Numbers at the edges of what JSON, JavaScript and PostgreSQL hold. */
export const edgeNumber = fc.oneof(
  fc.constantFrom(
    0,
    -0,
    1,
    -1,
    5e-324,
    -5e-324,
    1e-40,
    1.1754943508222875e-38,
    3.5e38,
    1e308,
    -1e308,
    Number.MAX_SAFE_INTEGER + 2,
    2 ** 31,
    -(2 ** 31) - 1,
    85,
    -127,
  ),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer(),
);

/** An array nested `depth` deep around `inner`, as JSON text (no stack is used to build it). */
export const nestedJson = (depth: number, inner = "1") => `${"[".repeat(depth)}${inner}${"]".repeat(depth)}`;

/** A hostile JSON value: ordinary JSON, nasty strings, edge numbers, nesting. */
export const hostileValue: fc.Arbitrary<unknown> = fc.oneof(
  { weight: 3, arbitrary: fc.jsonValue({ maxDepth: 3 }) },
  { weight: 2, arbitrary: nastyString() },
  { weight: 2, arbitrary: edgeNumber },
  { weight: 1, arbitrary: fc.integer({ min: 1, max: 400 }).map((d) => JSON.parse(nestedJson(d)) as unknown) },
  {
    weight: 1,
    arbitrary: fc.constantFrom(
      "",
      " ",
      "0001-01-01T00:00:00Z",
      "+275760-09-13T00:00:00.000Z",
      "2024-02-30T00:00:00Z",
      "9999-12-31T23:59:59Z",
      "NaN",
      "Infinity",
      "__proto__",
      "constructor",
      "x".repeat(5000),
    ),
  },
  { weight: 1, arbitrary: fc.constantFrom(null, true, false, [], {}, JSON.parse('{"__proto__":{"polluted":1}}') as unknown) },
);

/** `base` with one path changed: a field replaced by a hostile value, dropped, or an unknown one added. */
export function mutated(base: Record<string, unknown>): fc.Arbitrary<unknown> {
  const keys = Object.keys(base);
  const replace = fc.tuple(fc.constantFrom(...keys), hostileValue).map(([k, v]) => ({ ...base, [k]: v }));
  const drop = fc.constantFrom(...keys).map((k) => Object.fromEntries(Object.entries(base).filter(([key]) => key !== k)));
  const extra = fc.tuple(fc.oneof(fc.string({ maxLength: 8 }), fc.constantFrom("__proto__", "constructor", "id", "farmId")), hostileValue).map(([k, v]) => {
    const o: Record<string, unknown> = { ...base };
    Object.defineProperty(o, k, { value: v, enumerable: true, writable: true, configurable: true });
    return o;
  });
  const nested = fc.tuple(fc.constantFrom(...keys), fc.constantFrom(...keys), hostileValue).map(([k, inner, v]) => ({ ...base, [k]: { [inner]: v } }));
  return fc.oneof({ weight: 5, arbitrary: replace }, { weight: 1, arbitrary: drop }, { weight: 1, arbitrary: extra }, { weight: 1, arbitrary: nested });
}

/** Raw bodies that are not what any route takes: broken JSON, other encodings, NUL bytes, deep nesting. */
export const hostileText: fc.Arbitrary<string | Uint8Array> = fc.oneof(
  fc.string({ maxLength: 60 }),
  nastyString(),
  fc.jsonValue().map((v) => JSON.stringify(v).slice(0, -1)),
  fc.jsonValue().map((v) => `\ufeff${JSON.stringify(v)}`),
  fc.jsonValue().map((v) => Buffer.from(`\ufeff${JSON.stringify(v)}`, "utf16le") as Uint8Array),
  fc.jsonValue().map((v) => Buffer.from(JSON.stringify(v), "latin1") as Uint8Array),
  fc.uint8Array({ maxLength: 80 }),
  fc.integer({ min: 1, max: 5_000 }).map((d) => nestedJson(d)),
  fc.integer({ min: 1, max: 2_000 }).map((d) => `${'{"a":'.repeat(d)}1${"}".repeat(d)}`),
  fc.constantFrom("", "null", "[]", "{}", '{"a":1,"a":2}', "[\u0000]", '{"x":"\u0000"}', "1e999", "-0", '"\\ud800"'),
);

/** The one error envelope (lib/web/errors.ts) with words a person can act on. */
export function expectClearError(status: number, body: unknown, context: string) {
  expect(status, context).toBeGreaterThanOrEqual(400);
  expect(status, context).toBeLessThan(500);
  const e = (body as { error?: { code?: unknown; message?: unknown } } | null)?.error;
  expect(typeof e?.code, context).toBe("string");
  expect(typeof e?.message, context).toBe("string");
  expect((e!.message as string).trim().length, context).toBeGreaterThan(5);
  // Nothing internal: no SQLSTATE, driver words or stack frames.
  expect(e!.message as string, context).not.toMatch(/SQLSTATE|postgres|drizzle|TypeError|undefined is not|at .*\.[jt]s:\d+/i);
}
