// Logger CSV uploads, fuzzed:
// 1. in process (the bulk): the file reader and row mapping (lib/domain/csv-import.ts: decoding,
//    delimiter, quotes, each row's checks), and the upload reader (lib/web/import-body.ts: multipart
//    and JSON, caps); mixed files in UTF-8, UTF-8 with a BOM, Windows-1252 and UTF-16 with a BOM;
// 2. over the network: the built app's POST /api/farms/[farmId]/imports as the farm's owner, into
//    its database, and the files too large or too long to import.
import assert from "node:assert/strict";
import pg from "pg";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { importMapping, mapRows, MAX_IMPORT_BYTES, MAX_IMPORT_ROWS, readImportFile, type ImportMapping } from "@/lib/domain/csv-import";
import { METRICS } from "@/lib/domain/metrics";
import { readImportUpload } from "@/lib/web/import-body";
import { errorBody } from "@/lib/web/errors";
import { signIn, type Session } from "../helpers/app";
import { addMember, makeFarm } from "../integration/series/fixtures";
import { count, expectClearError, hostileText, nastyString, NASTY_CHARS, printTally, runs } from "./hostile";

const UNREADABLE = /[\p{Cc}\p{Cs}\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/u;

type Row = { good: boolean; cells: Record<"time" | "probe" | "metric" | "value" | "unit", string>; short?: boolean };
type FileSpec = {
  delimiter: "," | ";" | "\t";
  encoding: "utf8" | "utf8-bom" | "windows-1252" | "utf16le-bom" | "utf16be-bom";
  header: Record<"time" | "probe" | "metric" | "value" | "unit", string>;
  order: number[];
  rows: ((probes: string[], next: () => number) => Row)[];
  unclosedTail: boolean;
  crlf: boolean;
};

/** A row maker printed by its words in a counterexample, not as its source. */
const shown = <F extends object>(words: string, f: F): F => Object.assign(f, { [fc.toStringMethod]: () => words });

const GOOD = [
  { metric: "temperature", unit: "°C", min: -55, max: 84 },
  { metric: "temp", unit: "", min: -55, max: 84 },
  { metric: "moisture", unit: "%", min: 0, max: 100 },
  { metric: "nh3", unit: "ppm", min: 0, max: 1000 },
  { metric: "battery", unit: "mV", min: 0, max: 15_000 },
  { metric: "rssi", unit: "dBm", min: -150, max: 0 },
] as const;

const timeText = (ms: number, how: number) => {
  const iso = new Date(ms).toISOString();
  if (how === 0) return iso;
  if (how === 1) return String(Math.floor(ms / 1000));
  if (how === 2) return String(ms);
  return iso.replace("T", " ").replace(/\.\d+Z$/, ""); // naive, read in the mapping's zone (UTC)
};

const goodRow = fc
  .record({ kind: fc.constantFrom(...GOOD), frac: fc.double({ min: 0, max: 1, noNaN: true }), how: fc.integer({ min: 0, max: 3 }), p: fc.nat() })
  .map(({ kind, frac, how, p }) =>
    shown(`good(${kind.metric} ${frac} ${how} ${p})`, (probes: string[], next: () => number): Row => {
      const value = +(kind.min + (kind.max - kind.min) * frac).toFixed(3);
      return {
        good: true,
        cells: { time: timeText(next(), how), probe: probes[p % probes.length]!, metric: kind.metric, value: String(value), unit: kind.unit },
      };
    }),
  );

const nastyCell = nastyString(12).filter((s) => s.trim() !== "");
const badRow = fc
  .record({
    field: fc.constantFrom("probe", "metric", "time", "value", "unit", "future", "old", "range", "error", "control", "empty", "short"),
    text: nastyCell,
    p: fc.nat(),
  })
  .map(({ field, text, p }) =>
    shown(`bad(${field} ${JSON.stringify(text)} ${p})`, (probes: string[], next: () => number): Row => {
      const cells = { time: new Date(next()).toISOString(), probe: probes[p % probes.length]!, metric: "temperature", value: "21.5", unit: "°C" };
      const row: Row = { good: false, cells };
      if (field === "probe") cells.probe = `zz${text}`;
      if (field === "metric") cells.metric = `zz${text}`;
      if (field === "time") cells.time = `zz${text}`;
      if (field === "value") cells.value = `zz${text}`;
      if (field === "unit") cells.unit = `zz${text}`;
      if (field === "future") cells.time = new Date(Date.now() + 86_400_000).toISOString();
      if (field === "old") cells.time = "1999-12-31T23:00:00Z";
      if (field === "range") cells.value = "131";
      if (field === "error") cells.value = "-127";
      if (field === "control") cells.metric = `temperature${NASTY_CHARS[p % 4]}`; // NUL, SOH, ESC, DEL
      if (field === "empty") cells.value = "";
      if (field === "short") row.short = true;
      return row;
    }),
  );

const headerName = (base: string) =>
  fc.oneof(fc.constant(base), fc.constantFrom(`${base} ⁦x⁩`, `${base}\u202e`, `"${base}"`, ` ${base} `, `${base};${base}`, `Zeit ${base}`));
const fileSpec: fc.Arbitrary<FileSpec> = fc.record({
  delimiter: fc.constantFrom(",", ";", "\t"),
  encoding: fc.constantFrom("utf8", "utf8-bom", "windows-1252", "utf16le-bom", "utf16be-bom"),
  header: fc.record({
    time: headerName("time"),
    probe: headerName("probe"),
    metric: headerName("metric"),
    value: headerName("value"),
    unit: headerName("unit"),
  }),
  order: fc.shuffledSubarray([0, 1, 2, 3, 4], { minLength: 5, maxLength: 5 }),
  rows: fc.array(fc.oneof({ weight: 3, arbitrary: goodRow }, { weight: 2, arbitrary: badRow }), { minLength: 1, maxLength: 20 }),
  unclosedTail: fc.boolean(),
  crlf: fc.boolean(),
});

const KEYS = ["time", "probe", "metric", "value", "unit"] as const;
// RFC 4180 §2.6–2.7: a cell with a delimiter, quote or line break is quoted, its quotes doubled. Any
// of the three delimiters is quoted, as spreadsheets do, so that the header line says which one the
// file uses (a tab file whose names hold as many ";" as tabs is ambiguous to any reader).
const quote = (s: string, d: string) => (/["\r\n,;\t]/.test(s) || s.includes(d) || s !== s.trim() ? `"${s.replace(/"/g, '""')}"` : s);

function encode(text: string, encoding: FileSpec["encoding"]): Uint8Array {
  if (encoding === "utf8-bom") return Buffer.from(`\ufeff${text}`, "utf8");
  if (encoding === "utf16le-bom") return Buffer.from(`\ufeff${text}`, "utf16le");
  if (encoding === "utf16be-bom") return Buffer.from(`\ufeff${text}`, "utf16le").swap16();
  // Windows-1252 only for a text that has no other character than ASCII and "°"; else UTF-8.
  if (encoding === "windows-1252" && /^[\x00-\x7f°]*$/.test(text)) return Buffer.from(text, "latin1");
  return Buffer.from(text, "utf8");
}

/** The file's bytes, its mapping, and how many rows are good and bad. */
function buildFile(spec: FileSpec, probes: string[], next: () => number) {
  const d = spec.delimiter;
  const eol = spec.crlf ? "\r\n" : "\n";
  const cols = spec.order.map((i) => KEYS[i]!);
  const rows = spec.rows.map((r) => r(probes, next));
  const lines = [cols.map((k) => quote(spec.header[k], d)).join(d)];
  let good = 0;
  let bad = 0;
  for (const r of rows) {
    const cells = cols.map((k) => {
      let v = r.cells[k];
      if (k === "value" && d !== "," && r.good) v = v.replace(".", ","); // a decimal comma where the file allows it
      return quote(v, d);
    });
    lines.push((r.short ? cells.slice(0, 2) : cells).join(d));
    if (r.good) good++;
    else bad++;
  }
  if (spec.unclosedTail) {
    lines.push(`"${probes[0]}${d}never closed`);
    bad++;
  }
  const mapping: ImportMapping = importMapping.parse({ ...Object.fromEntries(KEYS.map((k) => [k, spec.header[k].trim()])), timezone: "UTC" });
  return { text: lines.join(eol) + eol, bytes: encode(lines.join(eol) + eol, spec.encoding), mapping, good, bad, rows };
}

describe("CSV uploads, in process", () => {
  const probes = ["p-1", "p-2", "p.three"];
  const ids = new Map(probes.map((p, i) => [p, i + 1]));

  it("a mixed file in any of the encodings keeps exactly its good rows and reports each bad one with its reason", () => {
    let k = 0;
    const now = Date.now();
    const next = () => now - 60_000 * ++k;
    fc.assert(
      fc.property(fileSpec, (spec) => {
        count("csv in process");
        const file = buildFile(spec, probes, next);
        const read = readImportFile(file.bytes, file.mapping);
        assert.ok(read.ok, `refused: ${JSON.stringify(!read.ok && read.refusal)}`);
        const out = mapRows(read.table, file.mapping, { probes: ids, now });
        assert.equal(out.readings.length, file.good, JSON.stringify(out.bad.slice(0, 5)));
        assert.equal(out.bad.length, file.bad, JSON.stringify(out.bad.slice(0, 5)));
        for (const b of out.bad) {
          assert.ok(b.line >= 2 && b.reason.length > 5);
          assert.doesNotMatch(b.reason, UNREADABLE, b.reason);
        }
        for (const r of out.readings) {
          const range = METRICS[r.metric].range!;
          assert.ok(r.value >= range.min && r.value <= range.max && !Number.isNaN(r.ts.getTime()));
        }
      }),
      runs(6_000, 41),
    );
  });

  it("any bytes as a file, with any mapping, are a refusal with words or rows with reasons, never a throw", () => {
    const mappingArb = fc.record({ time: nastyCell, value: nastyCell, probe: nastyCell, metric: nastyCell, unit: fc.option(nastyCell, { nil: undefined }) });
    fc.assert(
      fc.property(
        fc.oneof(
          hostileText.map((t) => Buffer.from(t)),
          fc.uint8Array({ maxLength: 400 }).map((b) => Buffer.from(b)),
          fc
            .array(fc.array(fc.oneof(nastyString(8), fc.constantFrom('"', '""', "\n", "\r", ",", ";")), { maxLength: 6 }), { maxLength: 12 })
            .map((rows) => Buffer.from(rows.map((r) => r.join(",")).join("\n"))),
        ),
        fc.oneof(mappingArb, fc.constant({ time: "time", value: "value", probe: "probe", metric: "metric" })),
        (bytes, raw) => {
          count("csv in process");
          const parsed = importMapping.safeParse({ ...raw, timezone: "UTC" });
          if (!parsed.success) return; // the form's own refusal (a 422), tested with the uploads below
          const read = readImportFile(bytes, parsed.data);
          if (!read.ok) {
            assert.ok(["invalid", "too_large"].includes(read.refusal.code));
            assert.ok(read.refusal.message.length > 5);
            assert.doesNotMatch(read.refusal.message, /\u0000/);
            return;
          }
          const out = mapRows(read.table, parsed.data, { probes: ids, now: Date.now() });
          for (const b of out.bad) assert.doesNotMatch(b.reason, UNREADABLE, b.reason);
        },
      ),
      runs(3_500, 42),
    );
  });

  it("the upload reader answers any form or JSON body with an upload or a clear 4xx", async () => {
    const field = fc.oneof(fc.constantFrom("time", "value", "probe", "metric", ""), nastyString(10));
    await fc.assert(
      fc.asyncProperty(
        fc.oneof(
          fc
            .record({
              file: fc.oneof(fc.uint8Array({ maxLength: 200 }), fc.constant(new Uint8Array(0))),
              name: fc.oneof(fc.constant("log.csv"), nastyString(12)),
              fields: fc.dictionary(fc.constantFrom("time", "value", "probe", "metric", "unit", "probeCode", "metricFixed", "timezone", "x"), field),
            })
            .map(({ file, name, fields }) => {
              const form = new FormData();
              form.set("file", new File([new Uint8Array(file)], name));
              for (const [k, v] of Object.entries(fields)) form.set(k, v);
              return new Request("http://127.0.0.1/api/x", { method: "POST", body: form });
            }),
          fc.tuple(hostileText, fc.constantFrom("application/json", "multipart/form-data; boundary=x", "text/csv", "")).map(
            ([body, type]) =>
              new Request("http://127.0.0.1/api/x", {
                method: "POST",
                headers: type ? { "content-type": type } : {},
                body: typeof body === "string" ? body : new Uint8Array(body),
              }),
          ),
        ),
        async (req) => {
          count("csv in process");
          try {
            const up = await readImportUpload(req);
            assert.ok(up.bytes.byteLength > 0 && up.bytes.byteLength <= MAX_IMPORT_BYTES);
            assert.doesNotMatch(up.fileName, /\u0000/);
          } catch (err) {
            const { status, body } = errorBody(err);
            assert.ok(status >= 400 && status < 500, `${status}: ${(err as Error).stack}`);
            assert.ok(body.error.message.length > 5);
          }
        },
      ),
      runs(500, 43),
    );
  });
});

type Outcome = { duplicate: boolean; import: { rowsTotal: number; rowsStored: number; rowsRejected: number; report: { line: number; reason: string }[] } };

describe("CSV uploads over the network to the running app", () => {
  let c: pg.Client;
  let owner: Session;
  let farm: Awaited<ReturnType<typeof makeFarm>>;
  const readingsOf = async () =>
    Number((await c.query(`select count(*)::int as n from readings where probe_id = any($1)`, [farm.probes.map((p) => p.id)])).rows[0].n);

  beforeAll(async () => {
    c = new pg.Client({ connectionString: inject("appDbUrl") });
    await c.connect();
    farm = await makeFarm(c, { zones: ["fresh", "curing"], name: "Zz Fuzz imports" });
    owner = await signIn(await addMember(c, farm.farmId, "owner", "fuzz-imports-pass"), "fuzz-imports-pass");
  });
  afterAll(async () => {
    await c?.end();
    printTally("csv-import");
  });

  it("each mixed upload stores exactly its good rows and reports each bad one", async () => {
    let k = 0;
    const now = Date.now();
    const next = () => now - 60_000 * ++k - 7_000; // another second than the in-process files
    await fc.assert(
      fc.asyncProperty(fileSpec, fc.boolean(), async (spec, asJson) => {
        count("csv over the network");
        const file = buildFile(
          spec,
          farm.probes.map((p) => p.code),
          next,
        );
        const before = await readingsOf();
        let res: Response;
        const fields = Object.fromEntries(Object.entries(file.mapping).filter(([, v]) => v !== undefined)) as Record<string, string>;
        if (asJson && spec.encoding.startsWith("utf8")) {
          res = await owner.fetch(`/api/farms/${farm.farmId}/imports`, { method: "POST", json: { fileName: "fuzz.csv", csv: file.text, mapping: fields } });
        } else {
          const form = new FormData();
          form.set("file", new File([new Uint8Array(file.bytes)], `fuzz-${k}.csv`, { type: "text/csv" }));
          for (const [key, v] of Object.entries(fields)) form.set(key, v);
          res = await owner.fetch(`/api/farms/${farm.farmId}/imports`, { method: "POST", body: form });
        }
        const text = await res.text();
        expect(res.status, text).toBe(201);
        const out = JSON.parse(text) as Outcome;
        expect(out.import.rowsStored, text).toBe(file.good);
        expect(out.import.rowsRejected, text).toBe(file.bad);
        expect((await readingsOf()) - before).toBe(file.good);
      }),
      runs(15, 44),
    );
  });

  it("a file over 10 MiB, one of more than 200,000 rows, a NUL-named file and a nested mapping get a clear 4xx", async () => {
    const post = (body: BodyInit, json?: unknown) =>
      owner.fetch(`/api/farms/${farm.farmId}/imports`, json === undefined ? { method: "POST", body } : { method: "POST", json });
    const form = (bytes: Uint8Array, name = "big.csv") => {
      const f = new FormData();
      f.set("file", new File([new Uint8Array(bytes)], name));
      for (const [key, v] of Object.entries({ time: "time", value: "value", probe: "probe", metric: "metric" })) f.set(key, v);
      return f;
    };
    const cases: [string, () => Promise<Response>, number][] = [
      ["over 10 MiB", () => post(form(Buffer.alloc(MAX_IMPORT_BYTES + 1, 0x41))), 413],
      ["too many rows", () => post(form(Buffer.from(`time,value,probe,metric\n${"1,2,3,4\n".repeat(MAX_IMPORT_ROWS + 1)}`))), 413],
      ["a NUL in the file name", () => post(form(Buffer.from("time,value,probe,metric\n"), "a\u0000b.csv")), 422],
      ["NUL bytes only", () => post(form(Buffer.alloc(1000, 0))), 422],
      [
        "a mapping nested 5,000 deep",
        // Written as text: JSON.stringify itself recurses and runs out of stack that deep.
        () =>
          owner.fetch(`/api/farms/${farm.farmId}/imports`, {
            method: "POST",
            headers: { "content-type": "application/json" },
            body: `{"fileName":"x.csv","csv":"time,value\\n","mapping":{"time":${"[".repeat(5000)}${"]".repeat(5000)}}}`,
          }),
        422,
      ],
    ];
    for (const [what, send, status] of cases) {
      count("csv over the network");
      const res = await send();
      const body = (await res.json()) as unknown;
      expect(res.status, what).toBe(status);
      expectClearError(res.status, body, what);
    }
    expect((await owner.fetch(`/api/farms/${farm.farmId}/imports`)).status).toBe(200);
  });
});
