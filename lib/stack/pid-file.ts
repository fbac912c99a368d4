// The servers the launcher starts from Debian (Redis, HAProxy) write a pid file; these read it and
// stop the process synchronously, so exit handlers can call them.
import { spawnSync } from "node:child_process";
import fs from "node:fs";

/** The pid in `pidFile` when that process is alive; else null. */
export function pidOf(pidFile: string): number | null {
  if (!fs.existsSync(pidFile)) return null;
  const pid = Number(fs.readFileSync(pidFile, "utf8").trim());
  try {
    process.kill(pid, 0);
    return pid;
  } catch {
    return null;
  }
}

/** SIGTERM to the process in `pidFile`, then waits until it has exited (throws after `timeoutMs`). */
export function stopByPidFile(pidFile: string, label: string, timeoutMs: number) {
  const pid = pidOf(pidFile);
  if (!pid) return;
  process.kill(pid, "SIGTERM");
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    try {
      process.kill(pid, 0);
    } catch {
      return;
    }
    spawnSync("sleep", ["0.1"]);
  }
  throw new Error(`${label} (pid ${pid}) did not stop within ${timeoutMs / 1000} s`);
}
