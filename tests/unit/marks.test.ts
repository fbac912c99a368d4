import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { MARKS } from "@/components/ui/mark-shapes";

// Marks mean one thing (issue 10, item 8): one registry, one shape per meaning, and the screens draw
// their marks from it rather than from shapes of their own.
const ROOT = path.resolve(import.meta.dirname, "../..");

// The shape as drawn: the same path written with other spacing or separators is the same shape.
const normal = (d: string) =>
  d
    .replace(/([a-zA-Z])/g, " $1 ")
    .replace(/(\d)-/g, "$1 -")
    .replace(/,/g, " ")
    .replace(/\s+/g, " ")
    .trim()
    .toUpperCase();

describe("the mark registry", () => {
  it("gives no two meanings the same shape", () => {
    const byShape = new Map<string, string[]>();
    for (const [name, m] of Object.entries(MARKS)) {
      const key = `${"stroke" in m ? "stroke" : "fill"}:${normal(m.d)}`;
      byShape.set(key, [...(byShape.get(key) ?? []), name]);
    }
    const shared = [...byShape.values()].filter((names) => names.length > 1);
    expect(shared).toEqual([]);
  });

  it("says what each mark means, once", () => {
    const means = Object.values(MARKS).map((m) => m.means);
    expect(new Set(means).size).toBe(means.length);
    for (const m of means) expect(m.length).toBeGreaterThan(2);
  });

  it("holds every mark the screens draw: no SVG shapes outside it", () => {
    const allowed = new Set(["components/ui/marks.tsx"]);
    const files = execFileSync("git", ["ls-files", "--cached", "--others", "--exclude-standard", "components", "app"], { cwd: ROOT, encoding: "utf8" })
      .split("\n")
      .filter((f) => f.endsWith(".tsx") && !allowed.has(f) && fs.existsSync(path.join(ROOT, f)));
    const drawing = files.filter((f) => /<(svg|path|circle|rect|polygon)\b/.test(fs.readFileSync(path.join(ROOT, f), "utf8")));
    expect(drawing).toEqual([]);
  });

  it("keeps symbols that stand in for marks off the screens", () => {
    const files = execFileSync("git", ["ls-files", "--cached", "--others", "--exclude-standard", "components", "app"], { cwd: ROOT, encoding: "utf8" })
      .split("\n")
      .filter((f) => f.endsWith(".tsx") && fs.existsSync(path.join(ROOT, f)));
    const symbols = files.filter((f) => /[▲△⚠✓✗✕●○◆]/.test(fs.readFileSync(path.join(ROOT, f), "utf8")));
    expect(symbols).toEqual([]);
  });
});
