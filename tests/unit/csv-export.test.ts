// The CSV writer and its guard against spreadsheet formulas (lib/domain/csv-export.ts).
import { parse } from "csv-parse/sync";
import { describe, expect, it } from "vitest";
import { fileSafe, neutralise, toCsv, zonedIso } from "@/lib/domain/csv-export";

const BOM = "\uFEFF";
const body = (csv: string) => (csv.startsWith(BOM) ? csv.slice(1) : csv);

describe("RFC 4180 §2", () => {
  it("ends every record, the last one too, with CRLF (§2.1, §2.2) and puts the header first (§2.3)", () => {
    expect(
      body(
        toCsv(
          ["a", "b"],
          [
            ["1", "2"],
            ["3", "4"],
          ],
        ),
      ),
    ).toBe("a,b\r\n1,2\r\n3,4\r\n");
  });

  it("encloses fields holding a comma, a double quote, CR or LF in double quotes (§2.6)", () => {
    const csv = body(toCsv(["h"], [["x,y"], ['say "hi"'], ["two\nlines"], ["a\rb"], ["plain"]]));
    expect(csv).toBe('h\r\n"x,y"\r\n"say ""hi"""\r\n"two\nlines"\r\n"a\rb"\r\nplain\r\n');
  });

  it("writes a double quote inside a field twice (§2.7)", () => {
    expect(body(toCsv(["h"], [['5" pot']]))).toBe('h\r\n"5"" pot"\r\n');
  });

  it("reads back with csv-parse to the same cells", () => {
    const rows = [["vegetable scraps, mixed", 'the "good" bin', "line one\r\nline two", "", "naïve °C"]];
    const back = parse(toCsv(["a", "b", "c", "d", "e"], rows), { bom: true, relax_column_count: false }) as string[][];
    expect(back).toEqual([["a", "b", "c", "d", "e"], rows[0]]);
  });

  it("starts with a UTF-8 byte order mark so spreadsheets read °C as °C", () => {
    expect(toCsv(["temperature (°C)"], []).startsWith(BOM)).toBe(true);
  });
});

// OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): cells beginning with
// = + - @ tab or carriage return are prefixed with a single quote.
describe("formula injection (OWASP CSV Injection)", () => {
  it("prefixes a note that is a formula with a single quote", () => {
    expect(neutralise('=HYPERLINK("http://x")')).toBe(`'=HYPERLINK("http://x")`);
    const back = parse(toCsv(["note"], [['=HYPERLINK("http://x")']]), { bom: true }) as string[][];
    expect(back[1]![0]).toBe(`'=HYPERLINK("http://x")`);
  });

  it('prefixes text "-2+3": text a person typed is never trusted to be a number', () => {
    expect(neutralise("-2+3")).toBe("'-2+3");
  });

  it("prefixes every trigger character: = + - @ tab CR (and NUL, OWASP ASVS 5.0 V1.2.10)", () => {
    for (const c of ["=", "+", "-", "@", "\t", "\r", "\0"]) expect(neutralise(`${c}1`)).toBe(`'${c}1`);
  });

  it("leaves text that only holds a trigger later on as it is", () => {
    expect(neutralise("a=b")).toBe("a=b");
    expect(neutralise("bin 2 - north")).toBe("bin 2 - north");
    expect(neutralise("'already quoted")).toBe("'already quoted");
  });

  it("writes a negative number we computed as a plain number: -3.5 is a number, not a formula", () => {
    expect(neutralise(-3.5)).toBe("-3.5");
    expect(neutralise(-70)).toBe("-70");
    // The same characters as text are guarded.
    expect(neutralise("-3.5")).toBe("'-3.5");
  });

  it("writes numbers in plain decimals and drops what is not a number", () => {
    expect(neutralise(0.0000012)).toBe("0.0000012");
    expect(neutralise(Number.NaN)).toBe("");
    expect(neutralise(Number.POSITIVE_INFINITY)).toBe("");
    expect(neutralise(null)).toBe("");
    expect(neutralise(undefined)).toBe("");
  });

  it("guards header cells as well as data", () => {
    expect(body(toCsv(["=cmd"], []))).toBe("'=cmd\r\n");
  });
});

describe("times in the farm's zone (ISO 8601 with offset)", () => {
  it("writes summer time with its offset and winter time with its own", () => {
    expect(zonedIso(new Date("2026-07-01T12:00:00Z"), "Europe/Dublin")).toBe("2026-07-01T13:00:00+01:00");
    expect(zonedIso(new Date("2026-01-15T12:00:00Z"), "Europe/Dublin")).toBe("2026-01-15T12:00:00+00:00");
    expect(zonedIso(new Date("2026-01-15T12:00:00Z"), "America/Chicago")).toBe("2026-01-15T06:00:00-06:00");
    expect(zonedIso(new Date("2026-01-15T12:00:00Z"), "Asia/Kolkata")).toBe("2026-01-15T17:30:00+05:30");
  });

  it("keeps milliseconds when there are any, and the instant survives Date.parse", () => {
    const t = new Date("2026-03-29T00:59:59.250Z");
    const s = zonedIso(t, "Europe/Dublin");
    expect(s).toBe("2026-03-29T00:59:59.250+00:00");
    expect(Date.parse(s)).toBe(t.getTime());
    const after = new Date("2026-03-29T01:00:00Z"); // Irish summer time starts at 01:00 UTC
    expect(zonedIso(after, "Europe/Dublin")).toBe("2026-03-29T02:00:00+01:00");
  });
});

describe("file names", () => {
  it("keeps letters, digits, - and _ only", () => {
    expect(fileSafe('Alder Row "farm"; rm -rf /')).toBe("Alder-Row-farm-rm-rf");
    expect(fileSafe("Ferme Élan")).toBe("Ferme-Elan");
    expect(fileSafe("???")).toBe("farm");
  });
});
