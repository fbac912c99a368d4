// Two ingest nodes as their own processes (`ingest/main.ts`) over one test database and one Redis
// started for the file, as `npm start -- --nodes 2` runs them.
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { inject } from "vitest";
import { startRedis, stopRedis, type RedisInstance } from "@/lib/stack/redis-server";
import { freePort } from "../ingest/helpers";

const root = path.resolve(import.meta.dirname, "../../..");

export type Node = { port: number; child: ChildProcess; out: () => string };

/** Redis for this file: its own name (beside the test cluster's) and a free port. */
export async function startTestRedis(tag: string): Promise<RedisInstance & { stop: () => void }> {
  const name = `${inject("clusterName")}-redis-${tag}`;
  const r = await startRedis({ name, port: await freePort() });
  return { ...r, stop: () => stopRedis(name) };
}

/** `ingest/main.ts` on `port`, sharing through `redisUrl`; resolves once it listens. */
export async function startNode(port: number, redisUrl: string): Promise<Node> {
  // Alerts go out by e-mail to the test mailbox (no VAPID keys: no pushes).
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    MQTT_PORT: String(port),
    MQTT_HOST: "127.0.0.1",
    REDIS_URL: redisUrl,
    DEBUG: "",
    SMTP_PORT: String(inject("smtpPort")),
  };
  delete env.VAPID_PUBLIC_KEY;
  delete env.VAPID_PRIVATE_KEY;
  // node --import tsx: one process, so SIGKILL hits the broker itself.
  const child = spawn(process.execPath, ["--import", "tsx", "ingest/main.ts"], {
    cwd: root,
    env,
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  child.stderr!.on("data", (b: Buffer) => (out += b.toString()));
  await new Promise<void>((resolve, reject) => {
    child.stdout!.on("data", (b: Buffer) => {
      out += b.toString();
      if (out.includes("ingest: MQTT on")) resolve();
    });
    child.once("exit", (code) => reject(new Error(`ingest exited (${code}) before listening:\n${out}`)));
  });
  return { port, child, out: () => out };
}

export function stopNode(node: Node, signal: NodeJS.Signals = "SIGTERM"): Promise<void> {
  if (node.child.exitCode !== null || node.child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    node.child.once("exit", () => resolve());
    node.child.kill(signal);
  });
}
