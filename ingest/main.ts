// `tsx ingest/main.ts [--role all|broker|workers]`: the long-running telemetry service started by `npm start`.
//   all      (default) the MQTT broker with its batching writer, and the workers below, in one process
//   broker   only the broker and writer: takes readings, acknowledges them once committed
//   workers  only the rule runner, the delivery worker and the daily digests (no MQTT port)
// Any number of broker and workers processes can share one database: the rule runner hears of
// readings by LISTEN from every writer and catches up on start, the open-alert unique index and the
// outbox's SKIP LOCKED claims keep alerts and sends single, the digest day is a compare-and-set.
// On SIGTERM or SIGINT it stops taking connections, commits what it holds, then exits.
import createDebug from "debug";
import { db, pool } from "@/db";
import { env } from "@/lib/server/env";
import { createSeriesMaintenance, type SeriesMaintenance } from "@/lib/server/series/maintenance";
import { createDeliveryWorker, type DeliveryWorker } from "./delivery-worker";
import { createDigestScheduler, type DigestScheduler } from "./digest";
import { createRuleRunner, type RuleRunner } from "./rule-runner";
import { startIngest, type Ingest } from "./service";

const ROLES = ["all", "broker", "workers"] as const;
type Role = (typeof ROLES)[number];

function roleFromArgs(argv: string[]): Role {
  const at = argv.findIndex((a) => a === "--role" || a.startsWith("--role="));
  if (at < 0) return "all";
  const value = argv[at]!.includes("=") ? argv[at]!.slice("--role=".length) : argv[at + 1];
  if (!ROLES.includes(value as Role)) {
    console.error(`ingest: --role must be one of ${ROLES.join(", ")} (got ${value ?? "nothing"})`);
    process.exit(2);
  }
  return value as Role;
}

const log = createDebug("wormward:ingest");
const role = roleFromArgs(process.argv.slice(2));
const e = env();
// A connection the server ends while it is checked out between two statements (the postmaster
// killed mid-transaction) emits "error" on its client, which pg's pool only listens for while the
// client is idle: unheard, it would end the process. The statement under way fails on its own and
// its caller retries; this only keeps the process standing.
pool().on("connect", (client) => client.on("error", (err) => log("database connection lost: %s", err.message)));
const withWorkers = role !== "broker";
const withBroker = role !== "workers";

// One pool for the process: the writer stores through it and the rule runner reads through it and
// LISTENs on one of its connections, hearing of readings from this node and every other writer.
let rules: RuleRunner | null = null;
let digests: DigestScheduler | null = null;
let deliveries: DeliveryWorker | null = null;
let seriesMaintenance: SeriesMaintenance | null = null;
if (withWorkers) {
  // catchUp: on start and after each lost LISTEN, every monitored zone is evaluated once, so
  // readings committed while no runner listened (this one restarting, the database restarting)
  // are judged too.
  rules = createRuleRunner({ pool: pool(), catchUp: true });
  digests = createDigestScheduler();
  // Pushes and alert e-mails leave the rule runner's chain: it queues them, this worker sends them.
  deliveries = createDeliveryWorker({ listenUrl: e.DATABASE_URL });
  // Daily rollups for long charts and pg_partman's months of readings, hourly (off the writer's path).
  seriesMaintenance = createSeriesMaintenance();
}
// Without the broker's listening socket nothing else holds the process open while the database is
// away (the runner's and worker's retry timers are unref'd): a workers process would just exit.
const keepAlive = withBroker ? null : setInterval(() => {}, 60_000);
let ingest: Ingest | null = null;
if (withBroker) {
  ingest = await startIngest({
    port: e.MQTT_PORT,
    host: e.MQTT_HOST,
    db: db(),
    redisUrl: e.REDIS_URL,
    proxyProtocol: e.MQTT_PROXY_PROTOCOL,
  });
  const shared = e.REDIS_URL ? ` (node ${ingest.nodeId}, shared through Redis)` : "";
  console.log(`ingest: MQTT on ${e.MQTT_HOST}:${ingest.port}${role === "broker" ? " (broker only)" : ""}${shared}`);
}
if (rules) {
  await rules.listening();
  console.log(`ingest: rule runner, deliveries and digests running${role === "workers" ? " (workers only)" : ""}`);
}

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  log("%s: flushing and closing", signal);
  if (keepAlive) clearInterval(keepAlive);
  const force = setTimeout(() => {
    console.error("ingest: shutdown took too long; exiting");
    process.exit(1);
  }, 20_000);
  force.unref();
  try {
    await ingest?.close();
    await rules?.stop();
    await deliveries?.stop();
    await digests?.stop();
    await seriesMaintenance?.stop();
    process.exit(0);
  } catch (err) {
    console.error("ingest: shutdown failed:", (err as Error).message);
    process.exit(1);
  }
}
process.on("SIGTERM", () => void stop("SIGTERM"));
process.on("SIGINT", () => void stop("SIGINT"));
