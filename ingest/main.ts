// `tsx ingest/main.ts`: the long-running telemetry service started by `npm start`.
// On SIGTERM or SIGINT it stops taking connections, commits what it holds, then exits.
import createDebug from "debug";
import { db, pool } from "@/db";
import { env } from "@/lib/server/env";
import { createSeriesMaintenance } from "@/lib/server/series/maintenance";
import { createDeliveryWorker } from "./delivery-worker";
import { createDigestScheduler } from "./digest";
import { createRuleRunner } from "./rule-runner";
import { startIngest } from "./service";

const log = createDebug("wormward:ingest");
const e = env();
// One pool for the process: the writer stores through it and the rule runner reads through it and
// LISTENs on one of its connections, hearing of readings from this node and every other writer.
const rules = createRuleRunner({ pool: pool() });
const digests = createDigestScheduler();
// Daily rollups for long charts and pg_partman's months of readings, hourly (off the writer's path).
const seriesMaintenance = createSeriesMaintenance();
// Pushes and alert e-mails leave the rule runner's chain: it queues them, this worker sends them.
const deliveries = createDeliveryWorker({ listenUrl: e.DATABASE_URL });
const ingest = await startIngest({
  port: e.MQTT_PORT,
  host: e.MQTT_HOST,
  db: db(),
});
console.log(`ingest: MQTT on ${e.MQTT_HOST}:${ingest.port}`);

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  log("%s: flushing and closing", signal);
  const force = setTimeout(() => {
    console.error("ingest: shutdown took too long; exiting");
    process.exit(1);
  }, 20_000);
  force.unref();
  try {
    await ingest.close();
    await rules.stop();
    await deliveries.stop();
    await digests.stop();
    await seriesMaintenance.stop();
    process.exit(0);
  } catch (err) {
    console.error("ingest: shutdown failed:", (err as Error).message);
    process.exit(1);
  }
}
process.on("SIGTERM", () => void stop("SIGTERM"));
process.on("SIGINT", () => void stop("SIGINT"));
