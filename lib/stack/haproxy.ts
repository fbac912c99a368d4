// HAProxy from Debian in front of the ingest nodes: TCP mode on 127.0.0.1, the config we write under
// .data/<name>/, a health check of each node, stopped cleanly. Probes see one MQTT address; a node
// that stops answering is taken out until it answers again, and its probes reconnect to another.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { ensureOsPackages } from "./os-packages";
import { pidOf, stopByPidFile } from "./pid-file";

const projectRoot = path.resolve(import.meta.dirname, "../..");

export type Backend = { name: string; port: number };
export type BalancerOptions = {
  name?: string;
  port: number;
  backends: Backend[];
  statsPort?: number;
  /** Each node connection starts with a PROXY protocol v1 line naming the probe's address (the nodes need MQTT_PROXY_PROTOCOL=1). */
  sendProxy?: boolean;
};

const paths = (name: string) => {
  const dir = path.join(projectRoot, ".data", name);
  return { dir, cfg: path.join(dir, "haproxy.cfg"), pid: path.join(dir, "haproxy.pid") };
};

export function haproxyConfig(opts: BalancerOptions): string {
  return `# Written by lib/stack/haproxy.ts on every start; edits are lost.
global
  # Each connection takes two descriptors (client and node side); 8000 fit the usual limit of 20000.
  maxconn 8000

defaults
  mode tcp
  timeout connect 5s
  # Longer than 1.5 keep-alives of any probe (MQTT 3.1.1 §3.1.2.10: the server closes after 1.5 x
  # Keep Alive), so HAProxy never cuts a quiet but live connection before the broker would.
  timeout client 15m
  timeout server 15m

frontend mqtt
  bind 127.0.0.1:${opts.port}
  default_backend ingest

backend ingest
  # Long-lived connections: the node with the fewest takes the next (HAProxy manual, "balance leastconn").
  balance leastconn
  # A TCP connect every 2 s; two misses take a node out, one answer brings it back.
  default-server inter 2s fall 2 rise 1 on-marked-down shutdown-sessions
${opts.sendProxy ? '  # The probe\'s own address reaches the node (HAProxy manual, "send-proxy"), so its per-address\n  # limits count each probe\'s address, not 127.0.0.1. "port" keeps the line off the health checks\n  # (manual, "check-send-proxy"): a bare connect is not a client and spends no address\'s budget.\n' : ""}${opts.backends
    .map((b) => `  server ${b.name} 127.0.0.1:${b.port} check${opts.sendProxy ? ` port ${b.port} send-proxy` : ""}`)
    .join("\n")}
${
  opts.statsPort
    ? `
listen stats
  mode http
  bind 127.0.0.1:${opts.statsPort}
  stats enable
  stats uri /
`
    : ""
}`;
}

async function listening(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect(port, "127.0.0.1");
    s.once("connect", () => {
      s.destroy();
      resolve(true);
    });
    s.once("error", () => resolve(false));
  });
}

/** Writes the config, checks it (haproxy -c) and starts HAProxy as a daemon; replaces one left running. */
export async function startHaproxy(opts: BalancerOptions): Promise<{ cfg: string; pid: number }> {
  const name = opts.name ?? "haproxy";
  ensureOsPackages(["haproxy"]);
  const p = paths(name);
  fs.mkdirSync(p.dir, { recursive: true });
  stopHaproxy(name);
  fs.writeFileSync(p.cfg, haproxyConfig(opts));
  const check = spawnSync("haproxy", ["-c", "-q", "-f", p.cfg], { encoding: "utf8" });
  if (check.status !== 0) throw new Error(`haproxy refused ${p.cfg}: ${check.stderr || check.stdout}`);
  const r = spawnSync("haproxy", ["-D", "-f", p.cfg, "-p", p.pid], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(`haproxy did not start (${r.status}): ${r.stderr || r.stdout}`);
  const until = Date.now() + 10_000;
  while (!(await listening(opts.port))) {
    if (Date.now() > until) throw new Error(`haproxy is not listening on 127.0.0.1:${opts.port}`);
    await new Promise((res) => setTimeout(res, 100));
  }
  return { cfg: p.cfg, pid: pidOf(p.pid)! };
}

/** Stops HAProxy `name` (SIGTERM: at once, connections closed) and waits for it to exit. */
export function stopHaproxy(name = "haproxy", timeoutMs = 5_000) {
  stopByPidFile(paths(name).pid, `haproxy ${name}`, timeoutMs);
}
