// One place where every benchmark leaves its figures: `.data/bench/latest.json`, a flat object of
// numbers (one key per figure, merged across the bench files of one `npm run bench`), and the
// table `npm run bench` prints at the end, each figure beside the ceiling measured in the same run.
// Benchmarks print; they never fail the build.
import fs from "node:fs";
import net from "node:net";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../..");
export const BENCH_DIR = path.join(root, ".data", "bench");
export const LATEST = path.join(BENCH_DIR, "latest.json");
/** The rows of the final table, kept beside the figures (one JSON line per row). */
const ROWS = path.join(BENCH_DIR, "rows.jsonl");

export type Figures = Record<string, number | null>;

/** A row of the table: a figure, and where there is one, the ceiling it is measured against in the
 * same run (the ratio is computed). `target` is the issue's target in words, for the reader. */
export type Row = { what: string; value: number | null; unit: string; ceiling?: number | null; ceilingWhat?: string; target?: string };

function readJson(file: string): Figures {
  try {
    return JSON.parse(fs.readFileSync(file, "utf8")) as Figures;
  } catch {
    return {};
  }
}

/** Starts a run: clears the previous run's figures and rows (called once by `npm run bench`). */
export function beginRun() {
  fs.mkdirSync(BENCH_DIR, { recursive: true });
  fs.writeFileSync(LATEST, "{}\n");
  fs.writeFileSync(ROWS, "");
}

/** Merges figures into latest.json (rounded to 3 significant decimals) and adds rows to the table. */
export function record(figures: Figures, rows: Row[] = []) {
  fs.mkdirSync(BENCH_DIR, { recursive: true });
  const all = readJson(LATEST);
  for (const [k, v] of Object.entries(figures)) all[k] = v == null || !Number.isFinite(v) ? null : Math.round(v * 1000) / 1000;
  fs.writeFileSync(LATEST, `${JSON.stringify(all, null, 2)}\n`);
  if (rows.length) fs.appendFileSync(ROWS, rows.map((r) => JSON.stringify(r)).join("\n") + "\n");
}

const num = (v: number | null | undefined) =>
  v == null ? "—" : Math.abs(v) >= 1000 ? Math.round(v).toLocaleString("en-GB") : String(Math.round(v * 100) / 100);

/** The table of every row recorded in this run, as text. */
export function table(): string {
  const rows: Row[] = fs.existsSync(ROWS)
    ? fs
        .readFileSync(ROWS, "utf8")
        .split("\n")
        .filter(Boolean)
        .map((l) => JSON.parse(l) as Row)
    : [];
  // A bench run again by name replaces its rows of the last run (the last row of each name counts).
  const last = new Map(rows.map((r) => [r.what, r]));
  rows.splice(0, rows.length, ...[...last.values()]);
  const cells = rows.map((r) => [
    r.what,
    `${num(r.value)} ${r.unit}`,
    r.ceiling == null ? "" : `${num(r.ceiling)} ${r.unit}${r.ceilingWhat ? ` (${r.ceilingWhat})` : ""}`,
    r.ceiling == null || r.value == null || r.ceiling === 0 ? "" : (r.value / r.ceiling).toFixed(2),
    r.target ?? "",
  ]);
  const head = ["figure", "measured", "ceiling, same run", "ratio", "target"];
  const widths = head.map((h, i) => Math.max(h.length, ...cells.map((c) => c[i]!.length)));
  const line = (c: string[]) => `| ${c.map((x, i) => x.padEnd(widths[i]!)).join(" | ")} |`;
  return [line(head), `|${widths.map((w) => "-".repeat(w + 2)).join("|")}|`, ...cells.map(line)].join("\n");
}

/** Percentile of a list of numbers (nearest rank). */
export function percentile(values: readonly number[], p: number): number | null {
  if (values.length === 0) return null;
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))]!;
}

/** A port nothing listens on now, on loopback (the OS picks it). */
export async function freePort(): Promise<number> {
  const s = net.createServer().listen(0, "127.0.0.1");
  await new Promise((r) => s.once("listening", r));
  const { port } = s.address() as net.AddressInfo;
  await new Promise((r) => s.close(r));
  return port;
}
