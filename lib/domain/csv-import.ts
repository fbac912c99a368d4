// Logger CSV to readings: read the file, apply the owner's column mapping, and say for every bad
// row its line number and which column is at fault. Pure: probes are looked up by the caller.
import { parse } from "csv-parse/sync";
import { z } from "zod";
import type { Metric } from "@/lib/domain/vocabulary";
import { METRICS, type MetricSpec } from "./metrics";
import { fahrenheitToCelsius } from "./units";
import { zonedToUtc } from "./clock";
import { EARLIEST_MS, FUTURE_SLACK_MS, hasControl, plainText, timeZone } from "./validation/fields";

export { zonedToUtc };

export const MAX_IMPORT_BYTES = 10 * 1024 * 1024;
export const MAX_IMPORT_ROWS = 200_000;
/** How many bad rows a report lists; the count stays exact beyond it. */
export const MAX_REPORTED = 500;

export type BadRow = { line: number; reason: string };
export type CsvRow = { line: number; cells: string[] };
export type CsvTable = { delimiter: string; header: string[]; rows: CsvRow[]; bad: BadRow[] };

/** Metric names a logger file may use, mapped to what we store (lib/domain/metrics.ts keys and suffixes). */
const METRIC_ALIASES: Record<string, Metric> = {
  temperature: "temperature",
  temp: "temperature",
  moisture: "moisture",
  "moisture-raw": "moisture-raw",
  moisture_raw: "moisture-raw",
  ammonia: "ammonia",
  nh3: "ammonia",
  "battery-voltage": "battery-voltage",
  battery: "battery-voltage",
  "battery-level": "battery-level",
  signal: "signal",
  rssi: "signal",
};
export const IMPORT_METRICS = [
  "temperature",
  "moisture",
  "moisture-raw",
  "ammonia",
  "battery-voltage",
  "battery-level",
  "signal",
] as const satisfies readonly Metric[];
const SPEC_OF = (metric: Metric): MetricSpec => METRICS[metric];

type Convert = (v: number) => number;
const same: Convert = (v) => v;
// Units people type into logger software, beside the SenML ones lib/domain/metrics.ts accepts. In a CSV
// "%" is a percentage as written; only SenML makes it a ratio (RFC 8428 §12.1 Note 2).
const EXTRA_UNITS: Partial<Record<Metric, Record<string, Convert>>> = {
  temperature: { "°c": same, c: same, degc: same, "°f": fahrenheitToCelsius, f: fahrenheitToCelsius, degf: fahrenheitToCelsius },
  moisture: { "%": same },
  "battery-voltage": { v: same, mv: (v) => v / 1000 },
  "battery-level": { "%": same },
  signal: { dbm: same },
};

export function unitConverter(metric: Metric, unit: string): Convert | null {
  const u = unit.trim();
  if (u === "") return same;
  const senml = SPEC_OF(metric).accepts.find((r) => r.unit === u);
  if (senml) return (v) => v * senml.scale + senml.offset;
  return EXTRA_UNITS[metric]?.[u.toLowerCase()] ?? null;
}

export const metricFromName = (name: string): Metric | null => METRIC_ALIASES[name.trim().toLowerCase()] ?? null;

const column = plainText("The column name", { min: 1, max: 200 });
const optionalColumn = z.preprocess((v) => (v === "" ? undefined : v), column.optional());

/** What the owner chose in the form: a column for each field, or one value for the whole file. */
export const importMapping = z
  .object({
    time: column,
    value: column,
    probe: optionalColumn,
    probeCode: z.preprocess((v) => (v === "" ? undefined : v), plainText("The probe code", { min: 1, max: 64 }).optional()),
    metric: optionalColumn,
    metricFixed: z.preprocess((v) => (v === "" ? undefined : v), z.enum(IMPORT_METRICS).optional()),
    unit: optionalColumn,
    timezone: timeZone.default("UTC"),
  })
  .superRefine((m, ctx) => {
    if (!m.probe && !m.probeCode) ctx.addIssue({ code: "custom", path: ["probe"], message: "Choose the probe column, or one probe for the whole file." });
    if (!m.metric && !m.metricFixed)
      ctx.addIssue({ code: "custom", path: ["metric"], message: "Choose the column of what each reading measures, or one measure for the whole file." });
  });
export type ImportMapping = z.infer<typeof importMapping>;

/** The first mapped column the header lacks, named by the form field that chose it. */
export function checkMapping(header: string[], mapping: ImportMapping): { field: string; message: string } | null {
  const labels = { time: "time", value: "value", probe: "probe", metric: "measure", unit: "unit" } as const;
  for (const key of Object.keys(labels) as (keyof typeof labels)[]) {
    const name = mapping[key];
    if (name !== undefined && !header.includes(name)) {
      const has = header.length ? header.map((h) => `"${visible(h)}"`).join(", ") : "none";
      return { field: key, message: `The file has no column "${name}" for the ${labels[key]}; its columns are ${has}.` };
    }
  }
  return null;
}

export type FileRefusal = { code: "invalid" | "too_large"; field: string; message: string };

/** An uploaded file read as a table, or why it cannot be imported at all: empty, too many rows,
 * or a mapped column its header lacks. Bad rows are not refusals; mapRows reports them. */
export function readImportFile(bytes: Uint8Array, mapping: ImportMapping): { ok: true; table: CsvTable } | { ok: false; refusal: FileRefusal } {
  const table = readCsv(decodeFile(bytes));
  const refuse = (code: FileRefusal["code"], field: string, message: string) => ({ ok: false as const, refusal: { code, field, message } });
  if (table.header.length === 0) return refuse("invalid", "file", "The file is empty: it needs a header line and rows.");
  if (table.rows.length > MAX_IMPORT_ROWS)
    return refuse("too_large", "file", `The file has ${table.rows.length} rows; import at most ${MAX_IMPORT_ROWS} at a time.`);
  const wrong = checkMapping(table.header, mapping);
  return wrong ? refuse("invalid", wrong.field, wrong.message) : { ok: true, table };
}

/** The mapping as stored: only the choices made (undefined fields dropped). */
export const plainMapping = (m: ImportMapping) => JSON.parse(JSON.stringify(m)) as Record<string, string>;

/** Two stored mappings compared key by key, so the same choices match whatever order they were sent in. */
export function sameMapping(a: Record<string, string>, b: Record<string, string>): boolean {
  const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
  return [...keys].every((k) => a[k] === b[k]);
}

/** Text of an uploaded file: UTF-16 when it opens with its byte-order mark (a spreadsheet's
 * "Unicode text"), else UTF-8, or Windows-1252 as older logger software writes it. */
export function decodeFile(bytes: Uint8Array): string {
  // WHATWG Encoding §6 (BOM sniff): FF FE is UTF-16LE, FE FF UTF-16BE; the decoder drops the mark.
  if (bytes[0] === 0xff && bytes[1] === 0xfe) return new TextDecoder("utf-16le").decode(bytes);
  if (bytes[0] === 0xfe && bytes[1] === 0xff) return new TextDecoder("utf-16be").decode(bytes);
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    return new TextDecoder("windows-1252").decode(bytes);
  }
}

/** The delimiter of the header line: the most frequent of , ; and tab outside quotes. */
export function sniffDelimiter(text: string): string {
  const counts = new Map<string, number>([
    [",", 0],
    [";", 0],
    ["\t", 0],
  ]);
  let quoted = false;
  for (const ch of text) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === "\n" || ch === "\r")) break;
    else if (!quoted && counts.has(ch)) counts.set(ch, counts.get(ch)! + 1);
  }
  let best = ",";
  for (const [d, n] of counts) if (n > counts.get(best)!) best = d;
  return best;
}

/** Reads a CSV file; the first non-empty line is the header. Rows keep their line numbers. */
export function readCsv(text: string): CsvTable {
  const delimiter = sniffDelimiter(text.replace(/^\uFEFF/, ""));
  const bad: BadRow[] = [];
  let lastEnd = 0;
  let lastEmpty = 0;
  const rows: CsvRow[] = [];
  parse(text, {
    delimiter,
    bom: true,
    relax_column_count: true,
    relax_quotes: true,
    skip_empty_lines: true,
    skip_records_with_error: true,
    on_record: (record, context) => {
      // context.lines is where a record ends; it starts after the previous one and any empty lines.
      const line = lastEnd + 1 + (context.empty_lines - lastEmpty);
      lastEnd = context.lines;
      lastEmpty = context.empty_lines;
      rows.push({ line, cells: record });
      return record;
    },
    on_skip: (err) => {
      const end = err?.lines ?? lastEnd + 1;
      const from = lastEnd + 1;
      const unclosed = err?.code === "CSV_QUOTE_NOT_CLOSED";
      bad.push({
        line: from,
        reason: unclosed
          ? `a quote (") opened on this line is never closed, so lines ${from}–${end} could not be read`
          : `this line could not be read as CSV (${err?.message ?? "unknown problem"})`,
      });
      lastEnd = end;
    },
  });
  const head = rows.shift();
  return { delimiter, header: head ? head.cells.map((c) => c.trim()) : [], rows, bad };
}

/** The header cells of a file's first line, for the mapping form. */
export function readHeader(text: string): { delimiter: string; header: string[] } {
  const firstLines = text
    .slice(0, 64 * 1024)
    .split(/\r?\n/)
    .filter((l) => l.trim() !== "")
    .slice(0, 1)
    .join("\n");
  const { delimiter, header } = readCsv(firstLines);
  return { delimiter, header };
}

/** What each mapped column holds, in the words of the import form ("Measures" for the metric). */
const COLUMN_WORDS = { time: "time", value: "value", probe: "probe", metric: "measure", unit: "unit" } as const;

const HEADER_GUESSES: Record<"time" | "probe" | "metric" | "value" | "unit", RegExp> = {
  time: /^(time|timestamp|date ?time|datetime|ts|date|when|utc)$/i,
  probe: /^(probe|probe ?code|probe ?id|sensor|sensor ?id|device|logger|code)$/i,
  metric: /^(metric|quantity|measure|measurement|parameter|channel|type)$/i,
  value: /^(value|reading|val|measured)$/i,
  unit: /^(unit|units)$/i,
};

/** A first guess at the mapping from common header names. */
export function guessMapping(header: string[]): Partial<Record<keyof typeof HEADER_GUESSES, string>> {
  const out: Partial<Record<keyof typeof HEADER_GUESSES, string>> = {};
  for (const key of Object.keys(HEADER_GUESSES) as (keyof typeof HEADER_GUESSES)[]) {
    const hit = header.find((h) => HEADER_GUESSES[key].test(h.trim()));
    if (hit) out[key] = hit;
  }
  return out;
}

const ISO_ZONED = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,6})?)?(Z|[+-]\d{2}:?\d{2})$/i;
const NAIVE = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,6}))?)?$/;
const EPOCH = /^\d{9,13}(\.\d+)?$/;

/** A logger's time cell to UTC ms, or null. Times without an offset are read in `timeZone`. */
export function parseTime(cell: string, timeZone: string): number | null {
  const s = cell.trim();
  if (EPOCH.test(s)) {
    const n = Number(s);
    // 13 digits are milliseconds, fewer are seconds.
    return s.split(".")[0]!.length >= 13 ? n : n * 1000;
  }
  if (ISO_ZONED.test(s)) {
    const t = Date.parse(s.replace(" ", "T").replace(/([+-]\d{2})(\d{2})$/, "$1:$2"));
    return Number.isNaN(t) ? null : t;
  }
  const m = NAIVE.exec(s);
  if (!m) return null;
  const [y, mo, d, h, mi, sec = "0", frac = "0"] = m.slice(1);
  const wall = Date.UTC(+y!, +mo! - 1, +d!, +h!, +mi!, +sec, Math.round(Number(`0.${frac}`) * 1000));
  // Date.UTC rolls 2024-02-30 into March; a real calendar date survives the round trip.
  const back = new Date(wall);
  if (back.getUTCMonth() !== +mo! - 1 || back.getUTCDate() !== +d! || +h! > 23 || +mi! > 59 || +sec > 59) return null;
  return zonedToUtc(wall, timeZone);
}

/** A number cell; a decimal comma is read as such only when the file is not comma-separated. */
export function parseNumber(cell: string, delimiter: string): number | null {
  let s = cell.trim().replace(/^\+/, "");
  if (delimiter !== "," && /^-?\d+,\d+$/.test(s)) s = s.replace(",", ".");
  if (!/^-?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(s)) return null;
  const n = Number(s);
  return Number.isFinite(n) ? n : null;
}

export type ImportedReading = { line: number; probeId: number; metric: Metric; ts: Date; value: number };
export type MappedRows = { readings: ImportedReading[]; bad: BadRow[]; repeats: number; total: number };

// Control characters shown as U+XXXX: a report is read by people and stored as jsonb, which
// cannot hold U+0000 (PostgreSQL 22P05). Bidirectional controls too: quoted raw, one turns the rest
// of the reason around on the screen (Unicode UAX #9).
const visible = (s: string) =>
  s.replace(/[\p{Cc}\p{Cs}\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/gu, (c) => `U+${c.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}`);
const quote = (s: string) => `"${visible(s.length > 40 ? `${s.slice(0, 40)}…` : s)}"`;

/** Applies a mapping to a read table: readings to store and bad rows with line and reason. */
export function mapRows(table: CsvTable, mapping: ImportMapping, ctx: { probes: ReadonlyMap<string, number>; now: number }): MappedRows {
  const bad: BadRow[] = [...table.bad];
  const index = (name: string | undefined) => (name === undefined ? -1 : table.header.indexOf(name));
  const missing = (["time", "value", "probe", "metric", "unit"] as const).filter((k) => mapping[k] !== undefined && index(mapping[k]) < 0);
  if (missing.length > 0) {
    const which = missing.map((k) => `${COLUMN_WORDS[k]} column ${quote(mapping[k]!)}`).join(", ");
    return {
      readings: [],
      bad: [{ line: 1, reason: `the header has no ${which}; it has ${table.header.map(quote).join(", ")}` }],
      repeats: 0,
      total: table.rows.length,
    };
  }
  const col = { time: index(mapping.time), value: index(mapping.value), probe: index(mapping.probe), metric: index(mapping.metric), unit: index(mapping.unit) };
  const seen = new Map<string, { line: number; value: number }>();
  const readings: ImportedReading[] = [];
  let repeats = 0;

  for (const { line, cells } of table.rows) {
    const cell = (i: number) => (i < 0 ? "" : (cells[i] ?? "").trim());
    if (cells.every((c) => c.trim() === "")) continue;
    const fail = (field: string, column: string | undefined, why: string) =>
      bad.push({ line, reason: `${COLUMN_WORDS[field as keyof typeof COLUMN_WORDS] ?? field}${column ? ` (column ${quote(column)})` : ""}: ${why}` });
    // A NUL or other control character in a cell we read is a damaged line, not a reading.
    const damaged = (["probe", "metric", "time", "value", "unit"] as const).find((k) => col[k] >= 0 && hasControl(cells[col[k]] ?? ""));
    if (damaged) {
      fail(damaged, mapping[damaged], `${quote(cells[col[damaged]]!.trim())} has a control character in it (a damaged line?); the row is left out`);
      continue;
    }

    const code = mapping.probe ? cell(col.probe) : mapping.probeCode!;
    const probeId = ctx.probes.get(code);
    if (code === "") {
      fail("probe", mapping.probe, "empty");
      continue;
    }
    if (probeId === undefined) {
      fail("probe", mapping.probe, `no probe ${quote(code)} on this farm`);
      continue;
    }

    const metricName = mapping.metric ? cell(col.metric) : mapping.metricFixed!;
    const metric = metricFromName(metricName);
    if (!metric) {
      fail("metric", mapping.metric, metricName === "" ? "empty" : `${quote(metricName)} is not a measure we store; use ${IMPORT_METRICS.join(", ")}`);
      continue;
    }

    const timeCell = cell(col.time);
    const t = parseTime(timeCell, mapping.timezone);
    if (timeCell === "") {
      fail("time", mapping.time, "empty");
      continue;
    }
    if (t === null) {
      fail(
        "time",
        mapping.time,
        `${quote(timeCell)} is not a time we can read; write 2024-05-01T14:30:00Z, 2024-05-01 14:30 (read in ${mapping.timezone}) or Unix seconds`,
      );
      continue;
    }
    // The same bounds as the logbook (lib/domain/validation/fields.ts): a logger clock may run a little
    // ahead; one that lost power restarts at 1970 or 2000, and nothing before 2000 is a reading.
    if (t > ctx.now + FUTURE_SLACK_MS) {
      fail("time", mapping.time, `${quote(timeCell)} is in the future; is the logger's clock right?`);
      continue;
    }
    if (t < EARLIEST_MS) {
      fail("time", mapping.time, `${quote(timeCell)} is before 2000; the logger's clock was probably not set`);
      continue;
    }

    const valueCell = cell(col.value);
    const raw = parseNumber(valueCell, table.delimiter);
    if (raw === null) {
      fail("value", mapping.value, valueCell === "" ? "empty" : `${quote(valueCell)} is not a number`);
      continue;
    }
    const unitCell = mapping.unit ? cell(col.unit) : "";
    const convert = unitConverter(metric, unitCell);
    if (!convert) {
      fail("unit", mapping.unit, `${quote(unitCell)} is not a unit we know for ${metric}`);
      continue;
    }
    const value = convert(raw);
    const spec = SPEC_OF(metric);
    if (spec.errorCodes.some((c) => Math.abs(value - c) < 1e-9)) {
      fail("value", mapping.value, `${value} ${spec.displayUnit} is a sensor error code, not a reading`);
      continue;
    }
    if (spec.range && (value < spec.range.min || value > spec.range.max)) {
      fail(
        "value",
        mapping.value,
        `${+value.toFixed(3)} ${spec.displayUnit} is outside what the sensor can read (${spec.range.min}…${spec.range.max} ${spec.displayUnit})`,
      );
      continue;
    }

    const key = `${probeId}|${metric}|${t}`;
    const earlier = seen.get(key);
    if (earlier) {
      if (earlier.value === value) repeats += 1;
      else fail("value", mapping.value, `line ${earlier.line} has another value for the same probe, measure and time; the first one is kept`);
      continue;
    }
    seen.set(key, { line, value });
    readings.push({ line, probeId, metric, ts: new Date(t), value });
  }
  bad.sort((a, b) => a.line - b.line);
  return { readings, bad, repeats, total: table.rows.length };
}
