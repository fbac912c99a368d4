// aedes-persistence-redis ships no types; what ingest/broker-backends.ts uses of it.
declare module "aedes-persistence-redis" {
  import type { AedesPersistence } from "aedes-persistence";
  import type { RedisOptions } from "ioredis";
  type Options = RedisOptions & { maxSessionDelivery?: number; packetTTL?: (packet: unknown) => number };
  export default function aedesPersistenceRedis(opts?: Options): AedesPersistence & { destroy(): Promise<void> | void };
}
