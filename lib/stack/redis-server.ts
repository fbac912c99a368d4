// Local Redis lifecycle, as db/local-pg.ts does for PostgreSQL: Debian's redis-server found or
// installed, started on 127.0.0.1 on a port of ours with its data and config under .data/<name>/,
// a password of its own, and stopped cleanly (SIGTERM: Redis flushes its append-only file and exits).
import { spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import createDebug from "debug";
import { Redis } from "ioredis";
import { ensureOsPackages } from "./os-packages";
import { pidOf, stopByPidFile } from "./pid-file";

const log = createDebug("wormward:redis");
const projectRoot = path.resolve(import.meta.dirname, "../..");

export type RedisInstance = { url: string; port: number; dataDir: string };
type State = { port: number; password: string };

async function portFree(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.createServer();
    s.once("error", () => resolve(false));
    s.listen(port, "127.0.0.1", () => s.close(() => resolve(true)));
  });
}

async function firstFreePort(from: number): Promise<number> {
  for (let port = from; port < from + 100; port++) if (await portFree(port)) return port;
  throw new Error(`no free port in ${from}–${from + 99}`);
}

const paths = (name: string) => {
  const dataDir = path.join(projectRoot, ".data", name);
  return { dataDir, conf: path.join(dataDir, "redis.conf"), pid: path.join(dataDir, "redis.pid"), state: path.join(projectRoot, ".data", `${name}.json`) };
};

async function ping(url: string): Promise<boolean> {
  const r = new Redis(url, { lazyConnect: true, maxRetriesPerRequest: 0, retryStrategy: () => null, connectTimeout: 1000 });
  r.on("error", () => {});
  try {
    await r.connect();
    return (await r.ping()) === "PONG";
  } catch {
    return false;
  } finally {
    r.disconnect();
  }
}

/** Starts (or finds running) the Redis server `name` (default "redis"); default port 56379 or the next free one. */
export async function startRedis(opts: { name?: string; port?: number } = {}): Promise<RedisInstance> {
  const name = opts.name ?? "redis";
  ensureOsPackages(["redis-server"]);
  const p = paths(name);
  fs.mkdirSync(p.dataDir, { recursive: true, mode: 0o700 });
  let state: State | null = fs.existsSync(p.state) ? (JSON.parse(fs.readFileSync(p.state, "utf8")) as State) : null;
  if (!state || (opts.port && opts.port !== state.port)) {
    state = { port: opts.port ?? (await firstFreePort(56379)), password: state?.password ?? randomBytes(18).toString("base64url") };
    fs.writeFileSync(p.state, JSON.stringify(state), { mode: 0o600 });
  }
  const url = `redis://:${encodeURIComponent(state.password)}@127.0.0.1:${state.port}/0`;
  if (pidOf(p.pid) && (await ping(url))) {
    log("redis %s already running on %d", name, state.port);
    return { url, port: state.port, dataDir: p.dataDir };
  }
  // The config holds the password, so it is readable by us only.
  const conf = [
    `bind 127.0.0.1`,
    `port ${state.port}`,
    `requirepass ${state.password}`,
    `dir ${p.dataDir}`,
    `daemonize yes`,
    `pidfile ${p.pid}`,
    `logfile ${path.join(p.dataDir, "redis.log")}`,
    // Sessions and QoS 1 messages in flight outlive a restart: append-only file, fsync once a
    // second (the Redis documentation's "persistence" page calls this the good default).
    `appendonly yes`,
    `appendfsync everysec`,
    `save ""`,
  ];
  fs.writeFileSync(p.conf, `${conf.join("\n")}\n`, { mode: 0o600 });
  const r = spawnSync("redis-server", [p.conf], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`redis-server failed (${r.status}): ${r.stderr || r.stdout}`);
  const until = Date.now() + 15_000;
  while (!(await ping(url))) {
    if (Date.now() > until) throw new Error(`redis-server did not answer on 127.0.0.1:${state.port}; see ${path.join(p.dataDir, "redis.log")}`);
    await new Promise((res) => setTimeout(res, 100));
  }
  log("started redis %s on %d", name, state.port);
  return { url, port: state.port, dataDir: p.dataDir };
}

/** Stops the server `name` and waits until it has exited (synchronous, for exit handlers). */
export function stopRedis(name = "redis", timeoutMs = 10_000) {
  stopByPidFile(paths(name).pid, `redis ${name}`, timeoutMs);
}

if (import.meta.url === `file://${process.argv[1]}`) {
  if (process.argv[2] === "stop") stopRedis(process.argv[3]);
  else console.log(`Redis on 127.0.0.1:${(await startRedis({ name: process.argv[3] })).port}`);
}
