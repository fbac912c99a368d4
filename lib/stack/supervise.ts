// A small supervisor for the launcher's services and for the fault suite: a child that dies without
// being asked to (a crash, kill -9, the OOM killer) is started again after a back-off, and a
// watchdog starts the local PostgreSQL cluster again when its postmaster dies. Nothing here is a
// process manager for production (use systemd or the like there, common practice); it keeps
// `npm start` and the tests standing up after a fault, without a hand on them.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import { startCluster, type Cluster } from "@/db/local-pg";

export type SuperviseOptions = {
  name: string;
  cmd: string;
  args: string[];
  env?: NodeJS.ProcessEnv;
  cwd?: string;
  /** stdout and stderr of every run are appended here. */
  logFile: string;
  /** First wait before a restart; doubled for each quick failure in a row, at most maxBackoffMs. */
  minBackoffMs?: number;
  maxBackoffMs?: number;
  /** A child that ran this long before it died counts as healthy: the next wait is minBackoffMs again. */
  steadyAfterMs?: number;
  /** Called when a child died unexpectedly, before its restart is scheduled. */
  onExit?: (info: { name: string; code: number | null; signal: NodeJS.Signals | null; restartInMs: number; restarts: number }) => void;
};

export type Supervised = {
  name: string;
  /** The running child's pid (undefined while waiting to restart). */
  pid: () => number | undefined;
  /** How many times a dead child was started again. */
  restarts: () => number;
  /** Resolves once a child other than `notPid` runs (its process exists; whether it serves is the caller's check). */
  running: (notPid?: number) => Promise<number>;
  /** Stops supervising and the child (SIGTERM, then SIGKILL after graceMs). */
  stop: (graceMs?: number) => Promise<void>;
};

export function supervise(o: SuperviseOptions): Supervised {
  const minMs = o.minBackoffMs ?? 250;
  const maxMs = o.maxBackoffMs ?? 10_000;
  const steadyMs = o.steadyAfterMs ?? 30_000;
  let child: ChildProcess | null = null;
  let stopping = false;
  let restarts = 0;
  let quickFailures = 0;
  let timer: NodeJS.Timeout | null = null;
  const waiters = new Set<() => void>();

  function launch() {
    timer = null;
    if (stopping) return;
    const log = fs.openSync(o.logFile, "a");
    const startedAt = Date.now();
    const c = spawn(o.cmd, o.args, { cwd: o.cwd, env: o.env ?? process.env, stdio: ["ignore", log, log] });
    fs.closeSync(log); // the child holds its own copy
    child = c;
    c.on("error", (err) => fs.appendFileSync(o.logFile, `[supervise] ${o.name} could not start: ${err.message}\n`));
    c.on("exit", (code, signal) => {
      if (child === c) child = null;
      if (stopping) return;
      quickFailures = Date.now() - startedAt >= steadyMs ? 0 : quickFailures + 1;
      const wait = Math.min(maxMs, minMs * 2 ** Math.max(0, quickFailures - 1));
      restarts++;
      o.onExit?.({ name: o.name, code, signal, restartInMs: wait, restarts });
      fs.appendFileSync(o.logFile, `[supervise] ${o.name} stopped (${signal ?? code}); starting it again in ${wait} ms\n`);
      timer = setTimeout(launch, wait);
    });
    for (const w of waiters) w();
  }
  launch();

  return {
    name: o.name,
    pid: () => child?.pid,
    restarts: () => restarts,
    running(notPid) {
      return new Promise((resolve) => {
        const check = () => {
          const pid = child?.pid;
          if (pid !== undefined && pid !== notPid && child?.exitCode === null) {
            waiters.delete(check);
            resolve(pid);
          }
        };
        waiters.add(check);
        check();
      });
    },
    async stop(graceMs = 20_000) {
      stopping = true;
      if (timer) clearTimeout(timer);
      const c = child;
      if (!c || c.exitCode !== null || c.signalCode !== null) return;
      const exited = new Promise<void>((r) => c.once("exit", () => r()));
      c.kill("SIGTERM");
      const force = setTimeout(() => c.kill("SIGKILL"), graceMs);
      await exited;
      clearTimeout(force);
    },
  };
}

/** Whether a process runs (a zombie nobody reaped counts as dead). */
export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== "EPERM") return false;
  }
  try {
    // /proc/<pid>/stat: "pid (comm) S ..."; Z is a zombie.
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    return stat.slice(stat.lastIndexOf(")") + 2, stat.lastIndexOf(")") + 3) !== "Z";
  } catch {
    return process.platform !== "linux"; // no /proc: trust kill(pid, 0)
  }
}

/** The postmaster's pid from its lock file (first line of postmaster.pid), or null when there is none. */
export function postmasterPid(dataDir: string): number | null {
  try {
    const pid = Number(fs.readFileSync(`${dataDir}/postmaster.pid`, "utf8").split("\n")[0]);
    return Number.isInteger(pid) && pid > 0 ? pid : null;
  } catch {
    return null;
  }
}

export type ClusterWatch = {
  restarts: () => number;
  stop: () => void;
};

/**
 * Checks the local cluster's postmaster every `everyMs` and starts the cluster again (db/local-pg.ts)
 * when it is gone: killed, crashed, or stopped by someone else. PostgreSQL refuses to start while
 * the dead postmaster's backends still hold its shared memory; they notice the death and leave
 * within moments, so a failed start is simply tried again on the next check, with a back-off.
 */
export function watchCluster(
  cluster: Pick<Cluster, "dataDir" | "port">,
  name: string,
  opts: { everyMs?: number; onRestart?: (ms: number) => void; onError?: (err: Error) => void } = {},
): ClusterWatch {
  const everyMs = opts.everyMs ?? 1_000;
  let restarts = 0;
  let failures = 0;
  let busy = false;
  let stopped = false;
  let nextTryAt = 0;
  const timer = setInterval(() => {
    if (busy || stopped || Date.now() < nextTryAt) return;
    const pid = postmasterPid(cluster.dataDir);
    if (pid !== null && processAlive(pid)) return;
    busy = true;
    const t0 = Date.now();
    startCluster({ name, port: cluster.port })
      .then(() => {
        if (stopped) return;
        restarts++;
        failures = 0;
        opts.onRestart?.(Date.now() - t0);
      })
      .catch((err: Error) => {
        failures++;
        nextTryAt = Date.now() + Math.min(10_000, 250 * 2 ** failures);
        opts.onError?.(err);
      })
      .finally(() => (busy = false));
  }, everyMs);
  timer.unref();
  return {
    restarts: () => restarts,
    stop: () => {
      stopped = true;
      clearInterval(timer);
    },
  };
}
