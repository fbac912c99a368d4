// The launcher's supervisor (lib/stack/supervise.ts) on its own: a killed child is started again, a
// child that keeps failing waits longer each time, and a stopped one stays stopped.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { processAlive, supervise, type Supervised } from "@/lib/stack/supervise";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "wormward-supervise-"));
const running: Supervised[] = [];
afterEach(async () => {
  await Promise.all(running.splice(0).map((s) => s.stop(1_000)));
});

const node = (name: string, code: string, extra: Partial<Parameters<typeof supervise>[0]> = {}) => {
  const s = supervise({ name, cmd: process.execPath, args: ["-e", code], logFile: path.join(dir, `${name}.log`), ...extra });
  running.push(s);
  return s;
};

describe("supervise", () => {
  it("starts a child killed with SIGKILL again, and logs why", async () => {
    const s = node("sleeper", "setInterval(() => {}, 1000)", { minBackoffMs: 50 });
    const first = await s.running();
    process.kill(first, "SIGKILL");
    const second = await s.running(first);
    expect(second).not.toBe(first);
    expect(processAlive(second)).toBe(true);
    expect(processAlive(first)).toBe(false);
    expect(s.restarts()).toBe(1);
    expect(fs.readFileSync(path.join(dir, "sleeper.log"), "utf8")).toContain("sleeper stopped (SIGKILL); starting it again in 50 ms");
  });

  it("waits twice as long after each quick failure in a row, up to the ceiling", async () => {
    const waits: number[] = [];
    const s = node("crasher", "process.exit(3)", { minBackoffMs: 20, maxBackoffMs: 80, onExit: (i) => waits.push(i.restartInMs) });
    while (waits.length < 5) await new Promise((r) => setTimeout(r, 20));
    expect(waits.slice(0, 5)).toEqual([20, 40, 80, 80, 80]);
    expect(s.restarts()).toBeGreaterThanOrEqual(5);
  });

  it("stop() ends the child and starts no other", async () => {
    const s = node("stopped", "setInterval(() => {}, 1000)", { minBackoffMs: 20 });
    const pid = await s.running();
    await s.stop();
    await new Promise((r) => setTimeout(r, 200));
    expect(processAlive(pid)).toBe(false);
    expect(s.pid()).toBeUndefined();
    expect(s.restarts()).toBe(0);
  });
});
