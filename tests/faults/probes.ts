// Simulated probes for the fault suite: real MQTT clients that publish one SenML temperature reading
// every `everyMs` at QoS 1, whatever happens to the broker. Each client has a fixed client id and a
// persistent session (clean: false), so MQTT.js keeps every unacknowledged message in its outgoing
// store and sends it again after a reconnect; a reading counts as acknowledged when its PUBACK comes.
import { connect, type MqttClient } from "mqtt";
import { probeBaseName } from "@/lib/domain/metrics";

export type ProbeLoadOptions = {
  port: number;
  code: string;
  token: string;
  everyMs: number;
  /** °C of every reading, with a little wobble so no rule sees a stuck sensor. */
  celsius: number;
  /** Readings first fill this many seconds of the past (one every backfillStepS, sent at once), then follow the clock. */
  backfillS?: number;
  backfillStepS?: number;
  /** Sends nothing until burst(): then the backfill all at once and nothing more (a probe that uploads what it kept, then sleeps). */
  burst?: boolean;
};

export type ProbeLoad = {
  code: string;
  /** Still publishing (a burst probe stops after its burst). */
  active: () => boolean;
  /** Resolves once the client is connected. */
  connected: () => Promise<void>;
  /** A burst probe's one upload. */
  burst: () => void;
  published: () => number;
  acked: () => number;
  failed: () => string[];
  /** Acknowledgements after `since` (epoch ms). */
  ackedSince: (since: number) => number;
  reconnects: () => number;
  /** Publishes the client failed (not stored by it) that the probe sent again. */
  resends: () => number;
  /** Stops publishing and waits for every reading sent so far to be acknowledged. */
  drain: (timeoutMs: number) => Promise<void>;
  close: () => Promise<void>;
};

export function startProbeLoad(o: ProbeLoadOptions): ProbeLoad {
  const client: MqttClient = connect(`mqtt://127.0.0.1:${o.port}`, {
    clientId: o.code,
    username: o.code,
    password: o.token,
    protocolVersion: 4,
    clean: false,
    reconnectPeriod: 250,
    connectTimeout: 3_000,
    keepalive: 10,
  });
  let reconnects = 0;
  client.on("reconnect", () => reconnects++);
  client.on("error", () => {}); // refused while the broker or the database is away: it tries again
  const topic = `wormward/${o.code}/readings`;
  const started = Date.now() / 1000;
  const backfill = o.backfillS ?? 0;
  const step = o.backfillStepS ?? 6;
  const backfillCount = Math.floor(backfill / step);
  let n = 0;
  let acked = 0;
  let lastAckAt = 0;
  const ackTimes: number[] = [];
  const failed: string[] = [];
  const inFlight = new Set<Promise<void>>();

  const at = (i: number) => (i < backfillCount ? started - backfill + i * step : started + ((i - backfillCount) * o.everyMs) / 1000);

  let resends = 0;
  let closing = false;
  // MQTT.js keeps a QoS 1 message in its outgoing store until PUBACK and sends it again after a
  // reconnect; a publish made while it is still replaying that store after a reconnect, though, fails
  // with "Connection closed" when the connection drops again, without being stored. A probe sends
  // such a reading again itself, unchanged (same time stamp, so a second copy is a no-op).
  function send(i: number, payload: string): Promise<void> {
    return client.publishAsync(topic, payload, { qos: 1 }).then(
      () => {
        acked++;
        lastAckAt = Date.now();
        ackTimes.push(lastAckAt);
      },
      async (err: Error) => {
        if (closing) return void failed.push(`${o.code} #${i}: ${err.message}`);
        resends++;
        await new Promise((r) => setTimeout(r, 250));
        return send(i, payload);
      },
    );
  }

  function publishNext() {
    const i = n++;
    const v = Math.round((o.celsius + ((i % 7) - 3) / 10) * 100) / 100;
    const payload = JSON.stringify([{ bn: probeBaseName(o.code), bt: Math.round(at(i) * 1000) / 1000, n: "temp", u: "Cel", v }]);
    const p: Promise<void> = send(i, payload).finally(() => inFlight.delete(p));
    inFlight.add(p);
  }
  let timer: NodeJS.Timeout | null = null;
  if (!o.burst) {
    for (let i = 0; i < backfillCount; i++) publishNext();
    timer = setInterval(publishNext, o.everyMs);
  }

  return {
    code: o.code,
    active: () => timer !== null,
    connected: () => (client.connected ? Promise.resolve() : new Promise((r) => client.once("connect", () => r()))),
    burst() {
      for (let i = 0; i < backfillCount; i++) publishNext();
    },
    published: () => n,
    acked: () => acked,
    failed: () => [...failed],
    ackedSince: (since) => ackTimes.filter((t) => t > since).length,
    reconnects: () => reconnects,
    resends: () => resends,
    async drain(timeoutMs) {
      if (timer) clearInterval(timer);
      timer = null;
      const until = Date.now() + timeoutMs;
      while (inFlight.size > 0) {
        if (Date.now() > until) throw new Error(`${o.code}: ${inFlight.size} reading(s) still unacknowledged after ${timeoutMs} ms`);
        await new Promise((r) => setTimeout(r, 100));
      }
    },
    async close() {
      closing = true;
      if (timer) clearInterval(timer);
      timer = null;
      await client.endAsync(true);
    },
  };
}
