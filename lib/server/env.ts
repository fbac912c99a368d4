import { z } from "zod";

// One schema for the app and the ingest service; read once, lazily, so tests can set the env first.
const envSchema = z.object({
  DATABASE_URL: z.string().url({ message: "DATABASE_URL must be a postgres:// URL" }),
  // A streaming replica of DATABASE_URL for chart reads (db/replica.ts); unset, they read the primary.
  DATABASE_REPLICA_URL: z.string().url({ message: "DATABASE_REPLICA_URL must be a postgres:// URL" }).optional(),
  // Reads leave the replica while it is more than this far behind (our choice: charts of readings a
  // few minutes apart do not show 5 s), and its lag is measured at most this often.
  REPLICA_MAX_LAG_MS: z.coerce.number().int().min(100).max(3_600_000).default(5_000),
  REPLICA_CHECK_MS: z.coerce.number().int().min(50).max(60_000).default(1_000),
  NEXTAUTH_SECRET: z.string().min(16).optional(),
  NEXTAUTH_URL: z.string().url().optional(),
  MQTT_PORT: z.coerce.number().int().min(0).max(65535).default(18830),
  MQTT_HOST: z.string().default("127.0.0.1"),
  // 1: every connection starts with HAProxy's PROXY protocol line (ingest/proxy-header.ts); only behind the balancer.
  MQTT_PROXY_PROTOCOL: z
    .enum(["0", "1"], { message: "MQTT_PROXY_PROTOCOL must be 0 or 1" })
    .default("0")
    .transform((v) => v === "1"),
  // Set: the ingest node shares sessions, fan-out and probe presence with other nodes through this Redis (ingest/broker-backends.ts).
  REDIS_URL: z
    .string()
    .regex(/^redis:\/\//, { message: "REDIS_URL must be a redis:// URL" })
    .optional(),
  VAPID_PUBLIC_KEY: z.string().optional(),
  VAPID_PRIVATE_KEY: z.string().optional(),
  VAPID_SUBJECT: z.string().default("mailto:alerts@wormward.invalid"),
  PUSH_CA_FILE: z.string().optional(),
  // Comma-separated push service hosts ("*.example.com" for a whole domain); empty = the browsers' own (lib/server/push/push-policy.ts).
  PUSH_SERVICE_HOSTS: z.string().optional(),
  // The local fake push service's origin (set by `npm start` and the tests); allowed on loopback.
  PUSH_FAKE_ORIGIN: z.string().url().optional(),
  PUSH_TIMEOUT_MS: z.coerce.number().int().min(100).max(120_000).default(10_000),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().optional(),
  MAIL_FROM: z.string().default("Wormward <alerts@wormward.invalid>"),
  APP_URL: z.string().url().default("http://127.0.0.1:3000"),
  // Where probes reach the broker and the HTTP ingest, as the connect snippets show them (lib/domain/probe-snippets.ts):
  // mqtt://host:1883 or mqtts://host:8883, and the full URL of POST /api/ingest. Unset: MQTT_HOST:MQTT_PORT and APP_URL's.
  PUBLIC_MQTT_URL: z
    .string()
    .regex(/^mqtts?:\/\/[^/\s]+\/?$/, { message: "PUBLIC_MQTT_URL must be mqtt://host:port or mqtts://host:port" })
    .optional(),
  PUBLIC_INGEST_URL: z.string().url({ message: "PUBLIC_INGEST_URL must be the full URL of /api/ingest" }).optional(),
  // How many proxies in front of the app append to X-Forwarded-For (HAProxy `option forwardfor`).
  // 0: the app faces clients itself, and the header is whatever a client wrote (lib/server/auth/client-address).
  TRUSTED_PROXY_HOPS: z.coerce.number().int().min(0).max(5).default(0),
});

export type Env = z.infer<typeof envSchema>;
let cached: Env | null = null;

export function env(): Env {
  if (cached) return cached;
  const parsed = envSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join("\n")}`);
  }
  cached = parsed.data;
  return cached;
}
