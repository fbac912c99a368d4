import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

// A comment or doc cites the published source itself (title, body, year, section, table), never a
// notes file that lives outside the repository: a reader of the code cannot open those.
const ROOT = path.resolve(import.meta.dirname, "../..");
const SELF = path.relative(ROOT, import.meta.filename);
const SOURCE_DIRS = ["app", "components", "lib", "db", "ingest", "fakes", "tests", "public"];
const SOURCE_EXT = /\.(ts|tsx|js|mjs|cjs|md|sql|css)$/;
// The notes files kept beside the repository, by the names a pointer to them uses.
const POINTER = /check-values|verified-techniques|shared\/notes|shared\/reference/i;

/** Files git tracks, plus new ones it would track: the same set a commit carries. */
function sourceFiles(): string[] {
  const out = execFileSync("git", ["ls-files", "--cached", "--others", "--exclude-standard"], { cwd: ROOT, encoding: "utf8" });
  return out
    .split("\n")
    .filter(Boolean)
    .filter((f) => (SOURCE_DIRS.includes(f.split("/")[0]!) && SOURCE_EXT.test(f)) || /^[^/]+\.(md|ts|mjs)$/.test(f))
    .filter((f) => f !== SELF && fs.existsSync(path.join(ROOT, f)));
}

/** "file:line: text" for every line that points at a notes file. */
function pointersIn(file: string, text: string): string[] {
  return text.split("\n").flatMap((line, i) => (POINTER.test(line) ? [`${file}:${i + 1}: ${line.trim()}`] : []));
}

describe("comments cite the published source itself", () => {
  it("no comment, doc or test name in the tracked source points at a notes file outside the repository", () => {
    const files = sourceFiles();
    // The walk really reached the code, the tests and the guides, so an empty list means something.
    expect(files).toEqual(expect.arrayContaining(["lib/mix.ts", "ingest/service.ts", "tests/unit/units.test.ts", "DEVELOPERS.md", "README.md"]));
    const found = files.flatMap((f) => pointersIn(f, fs.readFileSync(path.join(ROOT, f), "utf8")));
    expect(found, `cite the source itself instead:\n${found.join("\n")}`).toEqual([]);
  });

  it("a pointer to the notes names its file and line", () => {
    const text = [
      '// Cornell Waste Management Institute, "Compost Chemistry" (V)',
      "const x = 1; // check-values §2",
      "/* see shared/reference/ for more */",
      'it("acks after commit (verified-techniques.md)", () => {});',
    ].join("\n");
    expect(pointersIn("lib/example.ts", text)).toEqual([
      "lib/example.ts:2: const x = 1; // check-values §2",
      "lib/example.ts:3: /* see shared/reference/ for more */",
      'lib/example.ts:4: it("acks after commit (verified-techniques.md)", () => {});',
    ]);
  });

  it("is not fooled by the published sources themselves", () => {
    const text = "// RFC 8291 Appendix A\n// UK Weights and Measures Act 1963 s.1(1)\n// aedes 1.2 source, lib/handlers/publish.js";
    expect(pointersIn("tests/unit/x.test.ts", text)).toEqual([]);
  });
});
