import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

// A comment or doc cites the published source itself (title, body, year, section, table), never a
// notes file that lives outside the repository: a reader of the code cannot open those.
const ROOT = path.resolve(import.meta.dirname, "../..");
const SOURCE_DIRS = ["app", "components", "lib", "db", "ingest", "fakes", "tests", "public"];
const SOURCE_EXT = /\.(ts|tsx|js|mjs|cjs|md|sql|css)$/;
// The notes files kept beside the repository, by the names a pointer to them uses. Joined from
// their parts so that this file, which is walked too, holds no pointer of its own.
const NAMES = [
  ["check", "values"],
  ["verified", "techniques"],
].map((parts) => parts.join("-"));
const FOLDERS = ["notes", "reference"].map((f) => ["shared", f].join("/"));
const POINTER = new RegExp([...NAMES, ...FOLDERS].map((n) => n.replace(/[/-]/g, "\\$&")).join("|"), "i");

/** Files git tracks, plus new ones it would track: the same set a commit carries. */
function sourceFiles(): string[] {
  const out = execFileSync("git", ["ls-files", "--cached", "--others", "--exclude-standard"], { cwd: ROOT, encoding: "utf8" });
  return out
    .split("\n")
    .filter(Boolean)
    .filter((f) => (SOURCE_DIRS.includes(f.split("/")[0]!) && SOURCE_EXT.test(f)) || /^[^/]+\.(md|ts|mjs)$/.test(f))
    .filter((f) => fs.existsSync(path.join(ROOT, f)));
}

/** "file:line: text" for every line that points at a notes file. */
function pointersIn(file: string, text: string): string[] {
  return text.split("\n").flatMap((line, i) => (POINTER.test(line) ? [`${file}:${i + 1}: ${line.trim()}`] : []));
}

describe("comments cite the published source itself", () => {
  it("no comment, doc or test name in the tracked source points at a notes file outside the repository", () => {
    const files = sourceFiles();
    // The walk really reached the code, the tests and the guides, so an empty list means something.
    expect(files).toEqual(
      expect.arrayContaining([
        "lib/domain/mix.ts",
        "ingest/service.ts",
        "tests/unit/units.test.ts",
        "tests/unit/comments-cite-sources.test.ts",
        "DEVELOPERS.md",
        "README.md",
      ]),
    );
    const found = files.flatMap((f) => pointersIn(f, fs.readFileSync(path.join(ROOT, f), "utf8")));
    expect(found, `cite the source itself instead:\n${found.join("\n")}`).toEqual([]);
  });

  it("a pointer to the notes names its file and line", () => {
    const [values, techniques] = NAMES;
    const lines = [
      '// Cornell Waste Management Institute, "Compost Chemistry" (V)',
      `const x = 1; // ${values} §2`,
      `/* see ${FOLDERS[1]}/ for more */`,
      `it("acks after commit (${techniques}.md)", () => {});`,
    ];
    expect(pointersIn("lib/example.ts", lines.join("\n"))).toEqual([2, 3, 4].map((n) => `lib/example.ts:${n}: ${lines[n - 1]}`));
  });

  it("is not fooled by the published sources themselves", () => {
    const text = "// RFC 8291 Appendix A\n// UK Weights and Measures Act 1963 s.1(1)\n// aedes 1.2 source, lib/handlers/publish.js";
    expect(pointersIn("tests/unit/x.test.ts", text)).toEqual([]);
  });
});
