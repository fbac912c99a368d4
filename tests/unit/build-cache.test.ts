import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { spawnSync } from "node:child_process";
import { afterEach, describe, expect, it } from "vitest";
import { buildUnlessCurrent, sourceHash } from "@/lib/stack/build-cache";

const dirs: string[] = [];
function repo() {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), "ww-build-cache-"));
  dirs.push(d);
  spawnSync("git", ["init", "-q"], { cwd: d });
  fs.mkdirSync(path.join(d, "app"));
  fs.mkdirSync(path.join(d, "tests"));
  fs.writeFileSync(path.join(d, "app", "page.tsx"), "export default 1;\n");
  fs.writeFileSync(path.join(d, "tests", "a.test.ts"), "1;\n");
  fs.writeFileSync(path.join(d, ".gitignore"), ".next/\n");
  return d;
}
// What a finished `next build` leaves behind.
const fakeBuild = (d: string) => () => {
  fs.mkdirSync(path.join(d, ".next"), { recursive: true });
  fs.writeFileSync(path.join(d, ".next", "BUILD_ID"), "x");
};

afterEach(() => {
  for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
});

describe("reusing the web build", () => {
  it("builds the first time and reuses an unchanged tree", () => {
    const d = repo();
    let builds = 0;
    const build = () => {
      builds += 1;
      fakeBuild(d)();
    };
    expect(buildUnlessCurrent(d, build)).toBe("built");
    expect(buildUnlessCurrent(d, build)).toBe("reused");
    expect(builds).toBe(1);
  });

  it("builds again when a source changes, but not for a test file", () => {
    const d = repo();
    const before = sourceHash(d);
    fs.writeFileSync(path.join(d, "tests", "a.test.ts"), "2;\n");
    expect(sourceHash(d)).toBe(before);
    fs.writeFileSync(path.join(d, "app", "page.tsx"), "export default 2;\n");
    expect(sourceHash(d)).not.toBe(before);
  });

  it("a build that fails leaves no stamp, so the next start builds", () => {
    const d = repo();
    expect(buildUnlessCurrent(d, fakeBuild(d))).toBe("built");
    fs.writeFileSync(path.join(d, "app", "page.tsx"), "export default 3;\n");
    expect(() =>
      buildUnlessCurrent(d, () => {
        throw new Error("build failed");
      }),
    ).toThrow("build failed");
    let builds = 0;
    expect(
      buildUnlessCurrent(d, () => {
        builds += 1;
        fakeBuild(d)();
      }),
    ).toBe("built");
    expect(builds).toBe(1);
  });
});
