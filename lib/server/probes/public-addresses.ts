import { isLoopbackHost, parseBrokerUrl, type PublicAddresses } from "@/lib/domain/probe-snippets";
import { env } from "@/lib/server/env";

/** Where probes reach the broker and the HTTP ingest: PUBLIC_MQTT_URL and PUBLIC_INGEST_URL, else the broker's own
 * MQTT_HOST:MQTT_PORT and APP_URL's /api/ingest. */
export function publicAddresses(): PublicAddresses {
  const e = env();
  const mqtt = (e.PUBLIC_MQTT_URL && parseBrokerUrl(e.PUBLIC_MQTT_URL)) || { host: e.MQTT_HOST, port: e.MQTT_PORT, tls: false };
  const ingestUrl = e.PUBLIC_INGEST_URL ?? new URL("/api/ingest", e.APP_URL).toString();
  const loopback = isLoopbackHost(mqtt.host) || isLoopbackHost(new URL(ingestUrl).hostname.replace(/^\[(.*)\]$/, "$1"));
  return { mqtt, ingestUrl, loopback };
}
