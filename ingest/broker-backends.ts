// What an ingest node shares with the others. Without a Redis URL: nothing (aedes' in-memory
// persistence and emitter, presence in this process's memory), as one node always ran. With one:
// aedes-persistence-redis keeps sessions, subscriptions, wills and QoS 1 messages in flight where
// any node finds them, mqemitter-redis fans every publish out to every node (aedes README,
// "Clusters"), and probe presence is a registry in Redis of which node holds which connection.
import { randomUUID } from "node:crypto";
import os from "node:os";
import type { AedesOptions } from "aedes";
import createDebug from "debug";
import { Redis } from "ioredis";
import aedesPersistenceRedis from "aedes-persistence-redis";
import mqemitterRedis from "mqemitter-redis";

const log = createDebug("wormward:presence");

/** A probe's MQTT connections, wherever they are held. `conn` names one connection on this node. */
export type Presence = {
  /** A connection of the probe was accepted on this node. */
  opened(code: string, conn: string): Promise<void>;
  /** A connection closed; whether the probe still holds another one on some live node. */
  closed(code: string, conn: string): Promise<boolean>;
  /** Whether the probe's "gone" (its will, or said by itself) on this connection makes it not connected. */
  goneMeansOffline(code: string, conn: string): Promise<boolean>;
  /** Whether the probe holds a connection on some live node. */
  isConnected(code: string): Promise<boolean>;
  /** Every probe code with a connection on a live node. */
  connectedCodes(): Promise<string[]>;
  close(): Promise<void>;
};

export type BrokerBackends = {
  nodeId: string;
  /** Spread into aedes' options: `mq`, `persistence`, `id`. Empty for one node. */
  aedes: Partial<AedesOptions>;
  presence: Presence;
  /** Shared registry (Redis) or this process alone. */
  shared: boolean;
  /** After the broker has closed. */
  close(): Promise<void>;
};

export type BackendOptions = {
  redisUrl?: string;
  nodeId?: string;
  /** How long a node counts as alive after its last beat; its connections go with it (Redis only). */
  nodeTtlMs?: number;
  /** Called with the codes a dead node's connections left without any connection (Redis only). */
  onOrphaned?: (codes: string[]) => void;
};

export async function createBrokerBackends(opts: BackendOptions = {}): Promise<BrokerBackends> {
  const nodeId = opts.nodeId ?? `${os.hostname()}-${process.pid}-${randomUUID().slice(0, 8)}`;
  if (!opts.redisUrl) return { nodeId, aedes: {}, presence: localPresence(), shared: false, close: async () => {} };
  const url = opts.redisUrl;
  await untilRedisAnswers(url);
  // The persistence and the emitter each open their own two connections (their READMEs); presence has one more.
  const persistence = aedesPersistenceRedis(redisOptions(url));
  const mq = mqemitterRedis({ connectionString: url });
  // mqemitter-redis reports connection errors on `state` (mqemitter-redis.js), which its types leave out.
  (mq as unknown as { state: NodeJS.EventEmitter }).state.on("error", (err: Error) => log("redis emitter: %s", err.message));
  const presence = await redisPresence(url, nodeId, opts.nodeTtlMs ?? 15_000, opts.onOrphaned ?? (() => {}));
  return {
    nodeId,
    aedes: { id: nodeId, mq, persistence },
    presence,
    shared: true,
    async close() {
      await presence.close();
      // aedes closes its emitter but not its persistence (aedes.js close()); destroy() drops its connection.
      await Promise.resolve(persistence.destroy()).catch((err: Error) => log("persistence not closed cleanly: %s", err.message));
    },
  };
}

// A node started while its Redis is down (a machine booting, Redis restarting) waits for it and
// says so in words, every attempt, instead of failing on the first refused connection.
async function untilRedisAnswers(url: string) {
  const where = new URL(url).host;
  for (let attempt = 0; ; attempt++) {
    const r = new Redis(url, { lazyConnect: true, retryStrategy: () => null, maxRetriesPerRequest: 0, connectTimeout: 2_000 });
    r.on("error", () => {});
    try {
      await r.connect();
      await r.ping();
      await r.quit();
      if (attempt > 0) console.error(`ingest: Redis at ${where} answers; going on`);
      return;
    } catch (err) {
      r.disconnect();
      const waitMs = Math.min(5_000, 250 * 2 ** attempt);
      const why = (err as Error).message.startsWith("WRONGPASS") ? "refused the password in REDIS_URL" : `is not answering (${(err as Error).message})`;
      console.error(`ingest: Redis at ${where} ${why}; trying again in ${(waitMs / 1000).toFixed(1)} s`);
      await new Promise((res) => setTimeout(res, waitMs));
    }
  }
}

function redisOptions(url: string) {
  const u = new URL(url);
  return {
    host: u.hostname,
    port: Number(u.port || 6379),
    password: u.password ? decodeURIComponent(u.password) : undefined,
    db: u.pathname.length > 1 ? Number(u.pathname.slice(1)) : 0,
  };
}

// One process: presence is the connections this broker holds, as before nodes shared anything.
function localPresence(): Presence {
  const live = new Map<string, Set<string>>();
  return {
    async opened(code, conn) {
      const set = live.get(code) ?? new Set<string>();
      set.add(conn);
      live.set(code, set);
    },
    async closed(code, conn) {
      const set = live.get(code);
      set?.delete(conn);
      if (set && set.size > 0) return true;
      live.delete(code);
      return false;
    },
    // A will from a connection the probe has since replaced must not mark it as gone.
    async goneMeansOffline(code, conn) {
      return ![...(live.get(code) ?? [])].some((c) => c !== conn);
    },
    async isConnected(code) {
      return (live.get(code)?.size ?? 0) > 0;
    },
    async connectedCodes() {
      return [...live.keys()];
    },
    async close() {},
  };
}

// The registry in Redis (one server, not a Redis Cluster: the scripts name keys they build):
//   wormward:conns:<code>       hash  <node>|<conn> → opened at (ms)
//   wormward:node-conns:<node>  set   codes with a connection on that node
//   wormward:node:<node>        alive while its node beats (PX ttl)
//   wormward:nodes              set   nodes that have registered
//   wormward:online             set   codes with a connection on a live node
// A connection counts only while its node's key lives, so a node killed with its probes on it
// stops counting after the ttl, and the next sweep by any node clears what it left.
const P = "wormward:";
const LIVE_FN = `
local function live(code, except)
  local n = 0
  for _, f in ipairs(redis.call('HKEYS', '${P}conns:' .. code)) do
    if f ~= except then
      local node = string.match(f, '^(.-)|')
      if node and redis.call('EXISTS', '${P}node:' .. node) == 1 then n = n + 1 end
    end
  end
  return n
end
`;
const OPEN = `
redis.call('HSET', '${P}conns:' .. ARGV[1], ARGV[2] .. '|' .. ARGV[3], ARGV[4])
redis.call('SADD', '${P}node-conns:' .. ARGV[2], ARGV[1])
redis.call('SADD', '${P}nodes', ARGV[2])
redis.call('SADD', '${P}online', ARGV[1])
return 1`;
// Returns how many connections the probe still has on live nodes.
const CLOSE = `${LIVE_FN}
local code, node = ARGV[1], ARGV[2]
redis.call('HDEL', '${P}conns:' .. code, node .. '|' .. ARGV[3])
local mine = false
for _, f in ipairs(redis.call('HKEYS', '${P}conns:' .. code)) do
  if string.sub(f, 1, #node + 1) == node .. '|' then mine = true end
end
if not mine then redis.call('SREM', '${P}node-conns:' .. node, code) end
local n = live(code, nil)
if n == 0 then redis.call('SREM', '${P}online', code) end
return n`;
const LIVE_EXCEPT = `${LIVE_FN}
return live(ARGV[1], ARGV[2])`;
// Clears the connections of nodes whose key has expired (or of ARGV[1], a node leaving); returns
// the codes left with no connection on a live node.
const SWEEP = `${LIVE_FN}
local gone = {}
for _, node in ipairs(redis.call('SMEMBERS', '${P}nodes')) do
  if node == ARGV[1] or redis.call('EXISTS', '${P}node:' .. node) == 0 then
    for _, code in ipairs(redis.call('SMEMBERS', '${P}node-conns:' .. node)) do
      for _, f in ipairs(redis.call('HKEYS', '${P}conns:' .. code)) do
        if string.sub(f, 1, #node + 1) == node .. '|' then redis.call('HDEL', '${P}conns:' .. code, f) end
      end
      if live(code, nil) == 0 and redis.call('SREM', '${P}online', code) == 1 then table.insert(gone, code) end
    end
    redis.call('DEL', '${P}node-conns:' .. node)
    redis.call('SREM', '${P}nodes', node)
  end
end
return gone`;
// The online set, with codes whose connections all sit on dead nodes left out.
const CONNECTED = `${LIVE_FN}
local out = {}
for _, code in ipairs(redis.call('SMEMBERS', '${P}online')) do
  if live(code, nil) > 0 then table.insert(out, code) end
end
return out`;

async function redisPresence(url: string, nodeId: string, ttlMs: number, onOrphaned: (codes: string[]) => void): Promise<Presence> {
  if (nodeId.includes("|")) throw new Error(`node id ${nodeId} must not hold "|"`);
  const r = new Redis(url, { lazyConnect: true });
  r.on("error", (err: Error) => log("redis: %s", err.message));
  await r.connect();
  const beat = () => r.set(`${P}node:${nodeId}`, String(Date.now()), "PX", ttlMs);
  await beat();
  await r.sadd(`${P}nodes`, nodeId);
  const sweep = async (leaving = "") => {
    const gone = (await r.eval(SWEEP, 0, leaving)) as string[];
    if (gone.length) {
      log("connections of a stopped node cleared; %d probe(s) no longer connected", gone.length);
      onOrphaned(gone);
    }
  };
  const timer = setInterval(
    () => {
      beat()
        .then(() => sweep())
        .catch((err: Error) => log("beat or sweep failed: %s", err.message));
    },
    Math.max(250, Math.floor(ttlMs / 3)),
  );
  timer.unref();
  log("node %s registered", nodeId);
  return {
    async opened(code, conn) {
      await r.eval(OPEN, 0, code, nodeId, conn, String(Date.now()));
    },
    async closed(code, conn) {
      return Number(await r.eval(CLOSE, 0, code, nodeId, conn)) > 0;
    },
    // The registry alone says whether a probe is connected: a will may come from a connection
    // another node has already taken over, or be published for a dead node by a live one (aedes
    // _clearWills) while the probe is connected again; neither may mark it as gone.
    async goneMeansOffline(code) {
      return Number(await r.eval(LIVE_EXCEPT, 0, code, "")) === 0;
    },
    async isConnected(code) {
      return Number(await r.eval(LIVE_EXCEPT, 0, code, "")) > 0;
    },
    async connectedCodes() {
      return (await r.eval(CONNECTED, 0)) as string[];
    },
    async close() {
      clearInterval(timer);
      try {
        await r.del(`${P}node:${nodeId}`);
        await sweep(nodeId);
      } catch (err) {
        log("node %s not unregistered: %s", nodeId, (err as Error).message);
      }
      await r.quit().catch(() => r.disconnect());
    },
  };
}
