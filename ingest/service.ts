// aedes sends a QoS 1 PUBACK when authorizePublish calls back, so the message is stored there and
// the callback waits for the commit (aedes 1.2 source, lib/handlers/publish.js: authorizePublish,
// then enqueuePublish writes the PUBACK before broker.publish runs the `published` hook).
import net from "node:net";
import { Aedes, type AedesOptions, type AuthenticateError, type Client } from "aedes";
import createDebug from "debug";
import { db as sharedDb, type Db } from "@/db";
import { getProbeByCode } from "@/db/queries/probes";
import { verifyProbeToken } from "@/lib/server/probes/verify-token";
import { recordDoorRefusal } from "@/lib/server/probes/record-door-refusal";
import type { Probe } from "@/db/schema";
import { PRESENCE_GONE, PRESENCE_HERE, probeTopics } from "@/lib/domain/vocabulary";
import { DEFAULT_LIMITS, excerptOf, rejectionText, summarizeRejections, validateSenmlPayload, type TelemetryLimits } from "@/lib/domain/telemetry";
import { syncProbesOnline } from "@/db/queries/probes-presence";
import { createBrokerBackends } from "./broker-backends";
import { createConnectionLimits, DEFAULT_CONNECTION_LIMITS, type ConnectionLimits } from "./connection-limits";
import { readProxyHeader, type ProxySource } from "./proxy-header";
import { FrameGuard, PacketTooLarge } from "./frame-guard";
import { createWriter, type BatchOptions, type RetryOptions } from "./writer";

const log = createDebug("wormward:ingest");

export type IngestOptions = {
  port: number;
  host?: string;
  /** The process's one database handle, shared with the rule runner (default: db() from DATABASE_URL). */
  db?: Db;
  batch?: Partial<BatchOptions>;
  retry?: Partial<RetryOptions>;
  limits?: Partial<TelemetryLimits>;
  probeTtlMs?: number;
  connections?: Partial<ConnectionLimits>;
  /** A connection that sends no CONNECT in this time is closed (aedes connectTimeout). */
  connectTimeoutMs?: number;
  /** Largest CONNECT packet read before one is accepted. */
  connectMaxBytes?: number;
  /** Shares sessions, fan-out and presence with other nodes through this Redis (ingest/broker-backends.ts). */
  redisUrl?: string;
  /**
   * Each connection starts with a PROXY protocol v1 line from the balancer in front (HAProxy
   * `send-proxy`), whose client address the per-address limits count; a connection without one is
   * closed. Only for a node reached through the balancer alone (ingest/proxy-header.ts).
   */
  proxyProtocol?: boolean;
  /** This node's name in the shared registry and aedes' id (default: host, pid and a random part). */
  nodeId?: string;
  /** With Redis: how often probes.online is made to agree with the registry (default 5 s). */
  presenceSyncMs?: number;
  /** With Redis: how long a silent node's connections still count (default 15 s). */
  nodeTtlMs?: number;
};

// A probe's CONNECT holds a client id, a user name (its code), a 43-character token and a short
// will: a few hundred bytes. The broker reads no more than this from a stranger.
export const CONNECT_MAX_BYTES = 512;
// Fixed header (5), topic length (2) and topic, packet id (2): room for wormward/<code>/readings and more.
const PUBLISH_OVERHEAD_BYTES = 512;
const CONNECT_TIMEOUT_MS = 10_000;

export type Ingest = {
  port: number;
  nodeId: string;
  close(): Promise<void>;
  stats(): { batches: number; rows: number; retries: number; refusedConnections: number; cutPackets: number };
};

type Session = { probe: Probe; fetchedAt: number; refreshing: Promise<void> | null };

// CONNACK return codes, MQTT 3.1.1 §3.2.2.3
const IDENTIFIER_REJECTED = 2;
const SERVER_UNAVAILABLE = 3;
const BAD_USERNAME_OR_PASSWORD = 4;

function authError(returnCode: number, message: string): AuthenticateError {
  return Object.assign(new Error(message), { returnCode }) as AuthenticateError;
}

// <code> or <code>:<x> (codes hold no ":"): no probe can take over another's session. An empty id
// with a clean session gets a random one from aedes (§3.1.3-6).
function clientIdFits(client: Client, code: string): boolean {
  return client.id === code || client.id.startsWith(`${code}:`) || (client.clean && client.id.startsWith("aedes_"));
}

export async function startIngest(opts: IngestOptions): Promise<Ingest> {
  const d = opts.db ?? sharedDb();
  const writer = createWriter({ db: d, batch: opts.batch, retry: opts.retry });
  const probeTtlMs = opts.probeTtlMs ?? 60_000;
  const sessions = new WeakMap<Client, Session>();
  const limits = { ...DEFAULT_LIMITS, ...opts.limits };
  const admission = createConnectionLimits({ ...DEFAULT_CONNECTION_LIMITS, ...opts.connections });
  // Which connections a probe holds, on this node or (with Redis) on any: one key per connection.
  const connKeys = new WeakMap<Client, string>();
  let connSerial = 0;
  const connKey = (client: Client) => {
    let k = connKeys.get(client);
    if (!k) connKeys.set(client, (k = String(++connSerial)));
    return k;
  };
  const backends = await createBrokerBackends({
    redisUrl: opts.redisUrl,
    nodeId: opts.nodeId,
    nodeTtlMs: opts.nodeTtlMs,
    onOrphaned: () => void syncPresence(),
  });
  const { presence } = backends;
  // Presence work (a Redis round trip, then a status row) still under way; close() waits for it.
  const presenceWork = new Set<Promise<unknown>>();
  const track = <T>(p: Promise<T>) => {
    presenceWork.add(p);
    void p.finally(() => presenceWork.delete(p)).catch(() => {});
    return p;
  };
  // With several nodes, each node's own writes of probes.online can land out of order; the
  // registry is the truth, and this makes the column agree with it every few seconds.
  async function syncPresence() {
    if (!backends.shared) return;
    try {
      const changed = await syncProbesOnline(await presence.connectedCodes(), d);
      if (changed) log("presence: %d probe row(s) brought in line with the registry", changed);
    } catch (err) {
      log("presence not synced: %s", (err as Error).message);
    }
  }
  const presenceSync = backends.shared ? setInterval(() => void syncPresence(), opts.presenceSyncMs ?? 5_000) : null;
  presenceSync?.unref();

  const refuse = (client: Client | null, what: string, cb: (err: Error) => void) => {
    log("refused %s from %s", what, client?.id ?? "(no client)");
    cb(new Error(`not authorized: ${what}`));
  };

  async function currentProbe(s: Session): Promise<Probe | null> {
    if (Date.now() - s.fetchedAt > probeTtlMs) {
      s.refreshing ??= getProbeByCode(s.probe.code, d)
        .then((p) => {
          s.probe = p ?? { ...s.probe, archivedAt: new Date() }; // deleted: refused like archived
          s.fetchedAt = Date.now();
        })
        .catch((err: Error) => log("probe %s not re-read (%s); keeping what we had", s.probe.code, err.message))
        .finally(() => (s.refreshing = null));
      await s.refreshing;
    }
    return s.probe.archivedAt ? null : s.probe;
  }

  const originOf = (probe: Probe, topic: string | null = null, payload?: Buffer) => ({
    farmId: probe.farmId,
    probeId: probe.id,
    source: "mqtt" as const,
    topic,
    excerpt: payload ? excerptOf(payload) : null,
  });

  function statusJob(probe: Probe, status: { online?: boolean | null; seenAt?: Date }) {
    return { readings: [], rejections: [], status: { probeId: probe.id, ...status }, origin: originOf(probe) };
  }

  // probes.online holds whether the probe has a connection now: a detail the probe list shows
  // beside "reporting" or "silent", which go by readings (lib/domain/probe-presence.ts).
  function setConnected(probe: Probe, connected: boolean) {
    writer
      .submit(statusJob(probe, connected ? { online: true, seenAt: new Date() } : { online: false }))
      .catch((e: Error) => log("connected=%s of %s not stored: %s", connected, probe.code, e.message));
  }

  async function onReadings(probe: Probe, _client: Client, topic: string, payload: Buffer) {
    const v = validateSenmlPayload(probe, payload, { limits });
    // The excerpt is cut only for a message that gets a rejections row (most never do).
    const origin = {
      ...originOf(probe, topic),
      get excerpt() {
        return excerptOf(payload);
      },
    };
    if (v.rejections.length) {
      log("probe %s: %d record(s) refused (%s)", probe.code, v.rejections.length, [...new Set(v.rejections.map((r) => r.code))].join(", "));
    }
    const refused = summarizeRejections(v.rejections);
    await writer.submit({
      readings: v.readings,
      rejections: refused ? [{ ...origin, ...refused }] : [],
      status: { probeId: probe.id, ...v.status },
      origin,
    });
  }

  async function onPresence(probe: Probe, client: Client, topic: string, payload: Buffer) {
    const said = payload.toString("utf8").trim().toLowerCase();
    if (said !== PRESENCE_HERE && said !== PRESENCE_GONE) {
      const reason = rejectionText({ code: "bad-presence", reason: `a presence message says "${PRESENCE_HERE}" or "${PRESENCE_GONE}"` });
      await writer.submit({ ...statusJob(probe, {}), rejections: [{ ...originOf(probe, topic, payload), reason }] });
      return;
    }
    // A will from a connection the probe has since replaced must not mark it as gone.
    const gone = said === PRESENCE_GONE && (await presence.goneMeansOffline(probe.code, connKey(client)));
    const online = said === PRESENCE_HERE ? true : gone ? false : null;
    await writer.submit(statusJob(probe, { online, seenAt: new Date() }));
  }

  // MQTT 3.1.1 §3.3.1.3 makes a server store a retained message for later subscribers; nothing here
  // is for later subscribers, so it is refused: recorded with its reason and acknowledged (there is
  // no negative PUBACK in 3.1.1, and a dropped connection would have the probe resend it forever).
  // The flag is cleared so that aedes stores nothing; a retained will comes through here too.
  async function onRetained(probe: Probe, packet: { topic: string; payload: Buffer | string; retain: boolean }) {
    packet.retain = false;
    const payload = Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload);
    const reason = rejectionText({ code: "retained", reason: "a retained publish is not accepted (MQTT 3.1.1 §3.3.1.3); publish with RETAIN 0" });
    log("probe %s: retained publish to %s refused", probe.code, packet.topic);
    await writer.submit({ ...statusJob(probe, { seenAt: new Date() }), rejections: [{ ...originOf(probe, packet.topic, payload), reason }] });
  }

  // A PUBLISH over the cap that the frame guard read past without keeping: refused like any payload
  // over 16 KiB, and acknowledged so that the probe does not send it again.
  async function onReadPast(probe: Probe, packet: { topic: string; retain: boolean }, bytes: number) {
    packet.retain = false;
    const reason = rejectionText({
      code: "too-large",
      reason: `a packet of ${bytes} bytes was read past; payloads of at most ${limits.maxBytes} bytes are accepted`,
    });
    log("probe %s: publish of %d bytes to %s read past", probe.code, bytes, packet.topic);
    await writer.submit({ ...statusJob(probe, { seenAt: new Date() }), rejections: [{ ...originOf(probe, packet.topic), reason }] });
  }

  const handlers: AedesOptions = {
    connectTimeout: opts.connectTimeoutMs ?? CONNECT_TIMEOUT_MS,
    authenticate(client, username, password, done) {
      const code = username ?? "";
      const token = password?.toString("utf8") ?? "";
      if (!code || !token) return done(authError(BAD_USERNAME_OR_PASSWORD, "user name and password required"), false);
      if (!clientIdFits(client, code)) {
        log("refused client id %s for probe %s", client.id, code);
        return done(authError(IDENTIFIER_REJECTED, "client id must be the probe code or <code>:<suffix>"), false);
      }
      verifyProbeToken(code, token, d).then(
        (probe) => {
          if (!probe) {
            log("refused connection for %s: bad credentials or archived", code);
            // For the probe's own page (at most one row a minute); never holds up the answer.
            recordDoorRefusal("mqtt", code, "wrong-token").catch((err: Error) => log("cannot record the refusal of %s: %s", code, err.message));
            return done(authError(BAD_USERNAME_OR_PASSWORD, "bad user name or password"), false);
          }
          sessions.set(client, { probe, fetchedAt: Date.now(), refreshing: null });
          if (client.conn instanceof FrameGuard) client.conn.accept();
          done(null, true);
        },
        (err: Error) => {
          log("cannot check credentials of %s: %s", code, err.message);
          done(authError(SERVER_UNAVAILABLE, "server unavailable"), false);
        },
      );
    },

    authorizePublish(client, packet, cb) {
      if (packet.topic.startsWith("$SYS/")) return cb(new Error("$SYS/ topic is reserved"));
      const session = client ? sessions.get(client) : undefined;
      if (!client || !session) return refuse(client, `publish to ${packet.topic} without a session`, cb);
      // Only the probe's own readings and presence topics, matched exactly: anything else, the old
      // wormward/<code>/up among them, is refused like any unknown topic.
      const { readings, presence } = probeTopics(session.probe.code);
      if (packet.topic !== readings && packet.topic !== presence) {
        recordDoorRefusal("mqtt", session.probe.code, "wrong-topic", packet.topic).catch((err: Error) =>
          log("cannot record the refusal of %s: %s", session.probe.code, err.message),
        );
        return refuse(client, `publish to ${packet.topic}`, cb);
      }
      currentProbe(session)
        .then((probe) => {
          if (!probe) return refuse(client, `publish from archived probe ${session.probe.code}`, cb);
          const cut = client.conn instanceof FrameGuard ? client.conn.takeCut(packet.payload) : null;
          if (cut !== null) return onReadPast(probe, packet, cut).then(() => cb(null));
          if (packet.retain) return onRetained(probe, packet).then(() => cb(null));
          // MQTT 3.1.1 has no negative PUBACK (§3.4): a recorded rejection is acknowledged.
          return (packet.topic === readings ? onReadings : onPresence)(probe, client, packet.topic, packet.payload as Buffer).then(() => cb(null));
        })
        .catch((err: Error) => cb(err));
    },

    authorizeSubscribe(client, sub, cb) {
      const session = sessions.get(client);
      // Exact match: a filter with + or # (§4.7.1) would reach other probes' topics.
      if (session && sub.topic === probeTopics(session.probe.code).forProbe) return cb(null, sub);
      log("refused subscription to %s from %s", sub.topic, client.id);
      cb(null, null); // SUBACK 0x80, Failure (§3.9.3)
    },
  };

  const broker = await Aedes.createBroker({ ...handlers, ...backends.aedes });
  // aedes emits "error" (untyped) when clearing stored wills fails; unhandled, it would end the process.
  (broker as unknown as NodeJS.EventEmitter).on("error", (err: Error) => log("broker error: %s", err.message));
  broker.on("clientError", (client, err) => log("client %s error: %s", client.id, err.message));
  broker.on("clientReady", (client) => {
    const s = sessions.get(client);
    if (!s) return;
    log("probe %s connected as %s", s.probe.code, client.id);
    track(
      presence.opened(s.probe.code, connKey(client)).then(
        () => setConnected(s.probe, true),
        (err: Error) => log("connection of %s not registered: %s", s.probe.code, err.message),
      ),
    );
  });
  broker.on("clientDisconnect", (client) => {
    const s = sessions.get(client);
    if (!s) return;
    track(
      presence.closed(s.probe.code, connKey(client)).then(
        (elsewhere) => {
          if (elsewhere) return;
          log("probe %s disconnected", s.probe.code);
          setConnected(s.probe, false);
        },
        (err: Error) => log("disconnection of %s not registered: %s", s.probe.code, err.message),
      ),
    );
  });
  broker.on("keepaliveTimeout", (client) => log("keep-alive of %s ran out", client.id));

  const frameLimits = {
    connectMaxBytes: opts.connectMaxBytes ?? CONNECT_MAX_BYTES,
    packetMaxBytes: limits.maxBytes + PUBLISH_OVERHEAD_BYTES,
  };
  const counts = { refusedConnections: 0, cutPackets: 0 };
  const server = net.createServer((socket) => {
    if (!opts.proxyProtocol) return serve(socket, { address: socket.remoteAddress, port: socket.remotePort });
    void readProxyHeader(socket).then((from) => {
      if (from) return serve(socket, from);
      socket.destroy();
      // The balancer's health check connects and closes without a byte: not a refusal.
      if (socket.bytesRead === 0) return;
      counts.refusedConnections++;
      log("closed a connection from %s: no PROXY protocol line", socket.remoteAddress);
    });
  });
  function serve(socket: net.Socket, from: ProxySource) {
    const admitted = admission.admit(from.address);
    if (!admitted.ok) {
      counts.refusedConnections++;
      log("refused a connection from %s: too many %s", admitted.key, admitted.why === "attempts" ? "attempts" : `${admitted.why} connections`);
      socket.destroy();
      return;
    }
    const conn = new FrameGuard(socket, frameLimits, admitted.accepted, from);
    conn.on("close", admitted.closed);
    conn.on("error", (err) => {
      if (err instanceof PacketTooLarge) recordCut(conn, err, admitted.key);
    });
    broker.handle(conn as unknown as net.Socket);
  }

  // A probe's connection cut for an oversized packet that is not a PUBLISH (those are read past)
  // leaves a row its owner can read, one a minute at most; a stranger's, a log line.
  const lastCutRow = new Map<number, number>();
  function recordCut(conn: FrameGuard, err: PacketTooLarge, from: string) {
    counts.cutPackets++;
    const client = (conn as unknown as { client?: Client }).client; // aedes sets conn.client
    const s = client ? sessions.get(client) : undefined;
    log("cut off %s from %s: %s", s ? `probe ${s.probe.code}` : "a connection", from, err.message);
    if (!s || Date.now() - (lastCutRow.get(s.probe.id) ?? -Infinity) < 60_000) return;
    lastCutRow.set(s.probe.id, Date.now());
    const reason = rejectionText({ code: "too-large", reason: `${err.message}; the connection was closed` });
    writer
      .submit({ ...statusJob(s.probe, {}), rejections: [{ ...originOf(s.probe), reason }] })
      .catch((e: Error) => log("cut packet of %s not recorded: %s", s.probe.code, e.message));
  }
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, opts.host ?? "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });
  const port = (server.address() as net.AddressInfo).port;
  log("MQTT broker listening on %s:%d", opts.host ?? "127.0.0.1", port);

  let closed: Promise<void> | null = null;
  return {
    port,
    nodeId: backends.nodeId,
    stats: () => ({ ...writer.stats(), ...counts }),
    close() {
      closed ??= (async () => {
        const serverClosed = new Promise<void>((r) => server.close(() => r()));
        await new Promise<void>((r) => broker.close(() => r()));
        await serverClosed;
        if (presenceSync) clearInterval(presenceSync);
        // The disconnections of the closed clients reach the registry and the writer before it closes.
        while (presenceWork.size) await Promise.allSettled([...presenceWork]);
        await writer.close();
        await backends.close();
        log("ingest closed");
      })();
      return closed;
    },
  };
}
