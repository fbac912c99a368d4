import { describe, expect, it } from "vitest";
import {
  guessMapping,
  importMapping,
  mapRows,
  parseNumber,
  parseTime,
  readCsv,
  readHeader,
  sniffDelimiter,
  zonedToUtc,
  type ImportMapping,
} from "@/lib/domain/csv-import";

const NOW = Date.parse("2025-12-01T12:00:00Z");
const probes = new Map([
  ["alder-01", 11],
  ["alder-02", 12],
]);
const long: ImportMapping = importMapping.parse({ time: "time", probe: "probe", metric: "metric", value: "value" });

describe("reading the file", () => {
  it("keeps each row's line number, counting the header as line 1 and skipping blank lines", () => {
    const t = readCsv("time,probe,metric,value\n2025-05-01T00:00:00Z,alder-01,temperature,21\n\n\n2025-05-01T00:01:00Z,alder-01,temperature,22\n");
    expect(t.header).toEqual(["time", "probe", "metric", "value"]);
    expect(t.rows.map((r) => r.line)).toEqual([2, 5]);
  });

  it("a quoted cell over two lines is one row numbered by its first line", () => {
    const t = readCsv('time,probe,note\n2025-05-01T00:00:00Z,"alder\n-01",x\n2025-05-01T00:01:00Z,alder-01,y\n');
    expect(t.rows.map((r) => r.line)).toEqual([2, 4]);
    expect(t.rows[0]!.cells[1]).toBe("alder\n-01");
  });

  it("a quote never closed is reported at its line and the rows before it are kept", () => {
    const t = readCsv(
      'time,probe,metric,value\n2025-05-01T00:00:00Z,alder-01,temperature,21\n2025-05-01T00:01:00Z,"alder-01,temperature,22\n2025-05-01T00:02:00Z,alder-01,temperature,23\n',
    );
    expect(t.rows).toHaveLength(1);
    expect(t.bad).toEqual([{ line: 3, reason: expect.stringMatching(/never closed.*lines 3–4/) }]);
  });

  it("finds the delimiter of semicolon and tab files and ignores ones inside quotes", () => {
    expect(sniffDelimiter("time;probe;value\n1;2;3")).toBe(";");
    expect(sniffDelimiter("time\tprobe\tvalue")).toBe("\t");
    expect(sniffDelimiter('"a;b;c",d,e')).toBe(",");
    expect(readHeader("\uFEFFZeit;Fühler;Wert\n1;2;3").header).toEqual(["Zeit", "Fühler", "Wert"]);
  });

  it("guesses the mapping from common header names", () => {
    expect(guessMapping(["Timestamp", "Sensor", "Quantity", "Reading", "Unit"])).toEqual({
      time: "Timestamp",
      probe: "Sensor",
      metric: "Quantity",
      value: "Reading",
      unit: "Unit",
    });
  });
});

describe("cells", () => {
  it("reads ISO times with an offset, Unix seconds and milliseconds", () => {
    expect(parseTime("2025-05-01T14:30:00Z", "UTC")).toBe(Date.parse("2025-05-01T14:30:00Z"));
    expect(parseTime("2025-05-01 14:30:00+02:00", "UTC")).toBe(Date.parse("2025-05-01T12:30:00Z"));
    expect(parseTime("2025-05-01T14:30:00-0500", "UTC")).toBe(Date.parse("2025-05-01T19:30:00Z"));
    expect(parseTime("1746109800", "UTC")).toBe(1746109800_000);
    expect(parseTime("1746109800123", "UTC")).toBe(1746109800123);
  });

  it("reads a time without an offset in the chosen time zone, across daylight saving", () => {
    // Europe/Dublin: IST (UTC+1) from the last Sunday of March (EU Directive 2000/84/EC, Art. 1–2)
    expect(parseTime("2025-01-15 09:00", "Europe/Dublin")).toBe(Date.parse("2025-01-15T09:00:00Z"));
    expect(parseTime("2025-07-15 09:00", "Europe/Dublin")).toBe(Date.parse("2025-07-15T08:00:00Z"));
    expect(parseTime("2025-07-15 09:00", "America/New_York")).toBe(Date.parse("2025-07-15T13:00:00Z"));
    // 01:30 on 26 Oct 2025 happens twice in Dublin; the earlier (summer) offset is taken
    expect(zonedToUtc(Date.UTC(2025, 9, 26, 1, 30), "Europe/Dublin")).toBe(Date.parse("2025-10-26T00:30:00Z"));
  });

  it("refuses dates that do not exist and formats it cannot tell apart", () => {
    expect(parseTime("2025-02-30 10:00", "UTC")).toBeNull();
    expect(parseTime("2025-05-01 24:10", "UTC")).toBeNull();
    expect(parseTime("05/01/2025 10:00", "UTC")).toBeNull();
    expect(parseTime("yesterday", "UTC")).toBeNull();
  });

  it("reads a decimal comma only in files not separated by commas", () => {
    expect(parseNumber("21,5", ";")).toBe(21.5);
    expect(parseNumber("21,5", ",")).toBeNull();
    expect(parseNumber(" -3.25 ", ",")).toBe(-3.25);
    expect(parseNumber("1e2", ",")).toBe(100);
    expect(parseNumber("21.5°", ",")).toBeNull();
    expect(parseNumber("", ",")).toBeNull();
  });
});

describe("mapping rows to readings", () => {
  it("stores good rows and reports each bad one with its line and the column at fault", () => {
    const csv = [
      "time,probe,metric,value",
      "2025-05-01T00:00:00Z,alder-01,temperature,21.5", // 2 good
      "2025-05-01T00:00:00Z,alder-09,temperature,21.5", // 3 unknown probe
      "2025-05-01T00:01:00Z,alder-01,pressure,1013", // 4 unknown metric
      "01/05/2025,alder-01,temperature,21.5", // 5 time
      "2025-05-01T00:02:00Z,alder-01,moisture,wet", // 6 value not a number
      "2025-05-01T00:03:00Z,alder-01,moisture,140", // 7 out of range
      "2025-05-01T00:04:00Z,alder-01,temperature,85", // 8 sensor error code
      "2030-01-01T00:00:00Z,alder-01,temperature,20", // 9 future
      "2025-05-01T00:05:00Z,alder-02,nh3,4", // 10 good (alias)
      "2025-05-01T00:06:00Z,alder-02,moisture,", // 11 empty value
    ].join("\n");
    const out = mapRows(readCsv(csv), long, { probes, now: NOW });
    expect(out.readings.map((r) => [r.line, r.probeId, r.metric, r.ts.toISOString(), r.value])).toEqual([
      [2, 11, "temperature", "2025-05-01T00:00:00.000Z", 21.5],
      [10, 12, "ammonia", "2025-05-01T00:05:00.000Z", 4],
    ]);
    expect(out.bad.map((b) => b.line)).toEqual([3, 4, 5, 6, 7, 8, 9, 11]);
    const reason = (line: number) => out.bad.find((b) => b.line === line)!.reason;
    expect(reason(3)).toBe('probe (column "probe"): no probe "alder-09" on this farm');
    expect(reason(4)).toMatch(/^measure \(column "metric"\): "pressure" is not a measure/);
    expect(reason(5)).toMatch(/^time \(column "time"\): "01\/05\/2025" is not a time/);
    expect(reason(6)).toBe('value (column "value"): "wet" is not a number');
    expect(reason(7)).toMatch(/^value \(column "value"\): 140 % is outside/);
    expect(reason(8)).toMatch(/sensor error code/);
    expect(reason(9)).toMatch(/in the future/);
    expect(reason(11)).toBe('value (column "value"): empty');
    expect(out.total).toBe(10);
  });

  it("a NUL byte in a cell we read leaves that row out with its line, and one in a column we ignore does not", () => {
    const csv = [
      "time,probe,metric,value,note",
      "2025-05-01T00:00:00Z,alder-01,temperature,21.5,ok", // 2 good
      "2025-05-01T00:01:00Z,alder-01,temperature,2\u00001.5,ok", // 3 NUL in the value
      "2025-05-01T00:02:00Z,alder-01\u0000,temperature,21.5,ok", // 4 NUL in the probe code
      "2025-05-01T00:03:00Z,alder-01,temperature,21.7,scr\u0000atch", // 5 NUL in an unmapped column: kept
    ].join("\n");
    const out = mapRows(readCsv(csv), long, { probes, now: NOW });
    expect(out.readings.map((r) => r.line)).toEqual([2, 5]);
    expect(out.bad).toEqual([
      { line: 3, reason: 'value (column "value"): "2U+00001.5" has a control character in it (a damaged line?); the row is left out' },
      { line: 4, reason: expect.stringMatching(/^probe \(column "probe"\): "alder-01U\+0000" has a control character/) },
    ]);
    // Reasons are stored as jsonb, which cannot hold U+0000.
    expect(out.bad.some((b) => b.reason.includes("\u0000"))).toBe(false);
  });

  it("a mapping that names a column with a NUL byte is refused with the field", () => {
    const r = importMapping.safeParse({ time: "time\u0000", probe: "probe", metric: "metric", value: "value" });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]!.path).toEqual(["time"]);
  });

  it("a fixed probe and metric apply to every row, with units converted", () => {
    const m = importMapping.parse({
      time: "When",
      value: "Reading",
      unit: "Unit",
      probeCode: "alder-02",
      metricFixed: "temperature",
      timezone: "Europe/Dublin",
    });
    const csv = "When;Reading;Unit\n2025-07-15 09:00;68;°F\n2025-07-15 09:01;20,5;Cel\n2025-07-15 09:02;300;K\n2025-07-15 09:03;20;bar\n";
    const out = mapRows(readCsv(csv), m, { probes, now: NOW });
    expect(out.readings.map((r) => [r.ts.toISOString(), +r.value.toFixed(6)])).toEqual([
      ["2025-07-15T08:00:00.000Z", 20],
      ["2025-07-15T08:01:00.000Z", 20.5],
      ["2025-07-15T08:02:00.000Z", 26.85],
    ]);
    expect(out.bad).toEqual([{ line: 5, reason: 'unit (column "Unit"): "bar" is not a unit we know for temperature' }]);
  });

  it("a row repeated in the file is counted once; a conflicting repeat is reported", () => {
    const csv =
      "time,probe,metric,value\n2025-05-01T00:00:00Z,alder-01,temp,20\n2025-05-01T00:00:00Z,alder-01,temp,20\n2025-05-01T00:00:00Z,alder-01,temp,25\n";
    const out = mapRows(readCsv(csv), long, { probes, now: NOW });
    expect(out.readings).toHaveLength(1);
    expect(out.repeats).toBe(1);
    expect(out.bad).toEqual([{ line: 4, reason: expect.stringMatching(/line 2 has another value/) }]);
  });

  it("a mapping naming a column the file does not have is refused before any row", () => {
    const out = mapRows(readCsv("Zeit,Wert\n2025-05-01T00:00:00Z,20\n"), long, { probes, now: NOW });
    expect(out.readings).toEqual([]);
    expect(out.bad).toEqual([
      {
        line: 1,
        reason: expect.stringMatching(
          /^the header has no time column "time", value column "value", probe column "probe", measure column "metric"; it has "Zeit", "Wert"$/,
        ),
      },
    ]);
  });

  it("the mapping needs a probe and a metric, from a column or fixed, and a real time zone", () => {
    const r = importMapping.safeParse({ time: "t", value: "v", timezone: "Mars/Olympus" });
    expect(r.success).toBe(false);
    const fields = r.error!.issues.map((i) => i.path.join("."));
    expect(fields.sort()).toEqual(["metric", "probe", "timezone"]);
  });
});
