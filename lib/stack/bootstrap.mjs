// Entry of `npm start`, `npm test` and `npm run bench`: plain Node so it runs before any install.
// Installs dependencies when they are missing or stale, then hands over to the TypeScript launcher.
import { spawnSync, spawn } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "../..");
const lock = path.join(root, "package-lock.json");
const installed = path.join(root, "node_modules", ".package-lock.json");
const stale = !fs.existsSync(installed) || fs.statSync(lock).mtimeMs > fs.statSync(installed).mtimeMs + 1000;
if (stale) {
  console.log("Installing dependencies (npm ci)…");
  const r = spawnSync("npm", ["ci", "--no-audit", "--no-fund"], { cwd: root, stdio: "inherit" });
  if (r.status !== 0) process.exit(r.status ?? 1);
}
const tsx = path.join(root, "node_modules", ".bin", "tsx");
const child = spawn(tsx, [path.join(root, "lib", "stack", "main.ts"), ...process.argv.slice(2)], {
  cwd: root,
  stdio: "inherit",
});
for (const sig of ["SIGINT", "SIGTERM"]) process.on(sig, () => child.kill(sig));
child.on("exit", (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
