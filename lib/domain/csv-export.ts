// CSV files for people to open in a spreadsheet: RFC 4180 written by csv-stringify (from the csv
// project, beside the csv-parse that reads imports), with our own guard against formula injection.
import { stringify } from "csv-stringify/sync";

/** A cell as a caller hands it: text from people or the database, or a number we computed. */
export type Cell = string | number | null | undefined;

// OWASP "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): a spreadsheet treats a cell
// that begins with = + - @, a tab or a carriage return as a formula, so such a cell is written with
// a single quote before it, which the spreadsheet reads as "this is text". OWASP ASVS 5.0 V1.2.10
// adds the NUL character to the list; our inputs refuse control characters, but old rows are guarded too.
const FORMULA_START = /^[=+\-@\t\r\0]/;

/**
 * A cell made safe for a spreadsheet. Text that begins with a formula character gets a leading
 * single quote, always, whatever it looks like: "-2+3" is text a person typed and a spreadsheet
 * would compute it. A number we pass as a JavaScript number is written as its plain decimal
 * (String(n): digits, one optional leading "-", a point; never an exponent for our ranges), which a
 * spreadsheet reads as the number it is and never as a formula, so -3.5 °C stays a number. Only
 * finite numbers get that treatment; NaN and ±Infinity are written empty.
 */
export function neutralise(cell: Cell): string {
  if (cell === null || cell === undefined) return "";
  if (typeof cell === "number") return Number.isFinite(cell) ? plainNumber(cell) : "";
  return FORMULA_START.test(cell) ? `'${cell}` : cell;
}

// Plain decimal notation: String() switches to exponents below 1e-6 and from 1e21, which a
// spreadsheet would still read as a number, but people read worse.
function plainNumber(n: number): string {
  const s = String(n);
  return /e/i.test(s) ? n.toFixed(Math.min(20, Math.max(0, -Math.floor(Math.log10(Math.abs(n))) + 6))).replace(/\.?0+$/, "") : s;
}

/**
 * RFC 4180 §2: records end with CRLF (2.1, 2.2), an optional header line of the same shape (2.3),
 * fields holding a comma, a double quote, CR or LF are enclosed in double quotes (2.6) and a double
 * quote inside is written twice (2.7). csv-stringify quotes commas and quotes itself, but a lone CR or
 * LF only when told (quoted_match). A UTF-8 byte order mark comes first: RFC 4180 is silent on it,
 * and spreadsheets read a file without one in the machine's legacy code page ("°C" becomes "Â°C").
 */
export function toCsv(header: readonly string[], rows: readonly (readonly Cell[])[]): string {
  return stringify([header.map(neutralise), ...rows.map((r) => r.map(neutralise))], {
    record_delimiter: "windows",
    quoted_match: /[\r\n]/,
    bom: true,
  });
}

const fmtCache = new Map<string, Intl.DateTimeFormat>();
function wall(t: Date, timeZone: string) {
  let f = fmtCache.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone,
      hourCycle: "h23",
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
    });
    fmtCache.set(timeZone, f);
  }
  const parts = Object.fromEntries(f.formatToParts(t).map((p) => [p.type, p.value]));
  return { y: +parts.year!, mo: +parts.month!, d: +parts.day!, h: +parts.hour!, mi: +parts.minute!, s: +parts.second! };
}

const pad = (n: number, w = 2) => String(n).padStart(w, "0");

/** An instant as ISO 8601 local time of the zone with its offset that day, e.g.
 * 2026-05-01T14:30:00+01:00 (ISO 8601-1:2019 §5.4.2 with §4.3.13 offset; RFC 3339 §5.6);
 * milliseconds only when there are any. */
export function zonedIso(t: Date, timeZone: string): string {
  const w = wall(t, timeZone);
  const ms = t.getTime() % 1000 === 0 ? 0 : ((t.getTime() % 1000) + 1000) % 1000;
  const wallMs = Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s) + ms;
  const offsetMin = Math.round((wallMs - t.getTime()) / 60_000);
  const sign = offsetMin < 0 ? "-" : "+";
  const off = Math.abs(offsetMin);
  const frac = ms ? `.${pad(ms, 3)}` : "";
  return `${pad(w.y, 4)}-${pad(w.mo)}-${pad(w.d)}T${pad(w.h)}:${pad(w.mi)}:${pad(w.s)}${frac}${sign}${pad(Math.floor(off / 60))}:${pad(off % 60)}`;
}

/** A file name safe in a Content-Disposition header and on any disk: letters, digits, - and _ only. */
export function fileSafe(s: string): string {
  return (
    s
      .normalize("NFKD")
      // Combining marks left by NFKD (É → E + U+0301) go, so accented letters keep their base letter.
      .replace(/\p{M}/gu, "")
      .replace(/[^A-Za-z0-9_-]+/g, "-")
      .replace(/-{2,}/g, "-")
      .replace(/^-+|-+$/g, "")
      .slice(0, 60) || "farm"
  );
}
