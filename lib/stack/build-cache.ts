// `next build` takes 40–60 s on this kind of machine; an unchanged tree reuses the last build.
// The key is a hash of every file the build reads (tracked or new, minus tests and docs) and the lock file.
import { createHash } from "node:crypto";
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

const NOT_BUILT = [/^tests\//, /^\.ci\//, /^fakes\//, /^ingest\//, /\.md$/, /^\.data\//];

/** Files git sees (committed, changed or new but not ignored) that can change the web build. */
function buildInputs(root: string): string[] {
  const r = spawnSync("git", ["ls-files", "-z", "--cached", "--others", "--exclude-standard"], { cwd: root, encoding: "utf8" });
  if (r.status !== 0) return [];
  return [...new Set(r.stdout.split("\0").filter(Boolean))].filter((f) => !NOT_BUILT.some((re) => re.test(f))).sort();
}

/** A hash of the build's inputs, or null when the tree is not a git checkout (then always build). */
export function sourceHash(root: string): string | null {
  const files = buildInputs(root);
  if (files.length === 0) return null;
  const h = createHash("sha256");
  for (const f of files) {
    const p = path.join(root, f);
    if (!fs.existsSync(p)) continue; // deleted but not yet committed
    h.update(f).update("\0").update(fs.readFileSync(p)).update("\0");
  }
  return h.digest("hex");
}

const stampFile = (root: string) => path.join(root, ".next", "wormward-source-hash");

/** True when .next holds a finished build of exactly these sources. */
export function buildIsCurrent(root: string, hash: string | null): boolean {
  if (!hash || !fs.existsSync(path.join(root, ".next", "BUILD_ID"))) return false;
  try {
    return fs.readFileSync(stampFile(root), "utf8").trim() === hash;
  } catch {
    return false;
  }
}

export function stampBuild(root: string, hash: string | null) {
  if (hash) fs.writeFileSync(stampFile(root), `${hash}\n`);
}

/** Runs `build` unless the last finished build has the same inputs; says which it did. */
export function buildUnlessCurrent(root: string, build: () => void): "reused" | "built" {
  const hash = sourceHash(root);
  if (buildIsCurrent(root, hash)) return "reused";
  // A build that fails or is interrupted leaves no stamp behind, so the next start builds again.
  fs.rmSync(stampFile(root), { force: true });
  build();
  stampBuild(root, hash);
  return "built";
}
