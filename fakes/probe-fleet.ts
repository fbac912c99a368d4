// A simulated probe fleet for the demo farm: each probe publishes SenML (RFC 8428) JSON over MQTT
// to wormward/<code>/readings with its code and token, as lib/domain/metrics.ts names things. Readings follow a
// daily ambient swing, slow drying and sensor noise; scenarios (steady, heavy feed, drying, probe
// dropout) can be started per probe at run time through a small HTTP control endpoint.
//
//   tsx fakes/probe-fleet.ts --probes .data/demo-probes.json [--interval-s 60] [--scenario steady]
//                            [--control-port 8099] [--speed 1]
//   curl -X POST 127.0.0.1:8099/scenario -d '{"code":"alder-01","scenario":"heavy-feed"}'
import { realpathSync, readFileSync } from "node:fs";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { pathToFileURL } from "node:url";
import createDebug from "debug";
import { connectAsync, DefaultMessageIdProvider, Store, type IClientOptions, type IStore, type MqttClient } from "mqtt";
import { probeBaseName } from "@/lib/domain/metrics";
import { PRESENCE_GONE, PRESENCE_HERE, probeTopics } from "@/lib/domain/vocabulary";

const log = createDebug("wormward:fleet");

export const SCENARIOS = ["steady", "heavy-feed", "drying", "dropout"] as const;
export type ScenarioName = (typeof SCENARIOS)[number];

export type FleetProbe = {
  code: string;
  token: string;
  zone?: string;
  bin?: string;
  metrics?: string[];
  /** Where the zone stood at the end of the seeded history, so the live readings carry on from it. */
  last?: { temperature: number; moisture: number };
};

export type FleetOptions = {
  probes: FleetProbe[];
  host?: string;
  port?: number;
  /** Time between two messages of one probe. */
  intervalMs?: number;
  /** Scenario at start: heavy-feed applies to fresh zones, dropout to the last probe, drying to all. */
  scenario?: ScenarioName;
  /** Port of the HTTP control endpoint on 127.0.0.1; 0 picks a free one, null runs none. */
  controlPort?: number | null;
  /** Simulated hours per real hour for heating, cooling, drying and battery drain. */
  speed?: number;
  /** Seed of the noise, so a run can be repeated. */
  seed?: number;
  reconnectPeriodMs?: number;
  keepaliveS?: number;
  firmware?: string;
};

export type ProbeSnapshot = {
  code: string;
  zone: string;
  scenario: ScenarioName;
  connected: boolean;
  acknowledged: number;
  unacknowledged: number;
  temperature: number;
  moisture: number;
  ammonia: number;
};

export type Fleet = {
  stop(): Promise<void>;
  trigger(code: string, scenario: ScenarioName): void;
  /** Data messages the broker has acknowledged (PUBACK), over the whole fleet. */
  sent(): number;
  /** Data messages published but not yet acknowledged; they are kept and resent. */
  pending(): number;
  /** Resolves once every probe not in dropout has connected at least once. */
  ready(): Promise<void>;
  snapshot(): ProbeSnapshot[];
  controlUrl: string | null;
};

// Heavy feed: fresh food self-heats; about 2 °C/h for some hours is the episode the heat rule watches.
const HEAT_RATE_C_PER_H = 2;
const HEAT_HOURS = 4;
// After the episode the bed loses the extra heat with a time constant of a few hours.
const COOL_TAU_H = 3;
const DRY_RATE_STEADY = 0.02; // moisture points per hour
const DRY_RATE_DRYING = 0.4; // a heated room in winter
const MOISTURE_FLOOR = 35;
const DAILY_SWING_C = 1.2;

const ZONE_BASE: Record<string, { temp: number; wet: number }> = {
  fresh: { temp: 23, wet: 82 },
  working: { temp: 21.5, wet: 78 },
  curing: { temp: 20, wet: 72 },
};

/** mulberry32: small, fast and good enough for sensor noise. */
function prng(seed: number) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  // Box–Muller for normally distributed noise.
  const gauss = () => Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next());
  return { next, gauss };
}

type StorePacket = Parameters<IStore["put"]>[0];

/** A store whose unacknowledged packets outlive one client, so a new connection resends them. */
class KeptStore implements IStore {
  acked = 0;
  private readonly inner = new Store({ clean: false });
  private readonly readingIds = new Set<number>();
  constructor(private readonly readingsTopic: string) {}
  put(packet: StorePacket, cb: Parameters<IStore["put"]>[1]) {
    if (packet.cmd === "publish" && packet.topic === this.readingsTopic && packet.messageId !== undefined) this.readingIds.add(packet.messageId);
    this.inner.put(packet, cb);
    return this;
  }
  createStream() {
    return this.inner.createStream();
  }
  del(packet: Pick<StorePacket, "messageId">, cb: Parameters<IStore["del"]>[1]) {
    this.inner.del(packet, (err, removed) => {
      if (!err && packet.messageId !== undefined && this.readingIds.delete(packet.messageId)) this.acked += 1;
      cb(err, removed);
    });
    return this;
  }
  get(packet: Pick<StorePacket, "messageId">, cb: Parameters<IStore["get"]>[1]) {
    this.inner.get(packet, cb);
    return this;
  }
  close(cb: Parameters<IStore["close"]>[0]) {
    this.inner.close(cb);
  }
  unacknowledged(): number {
    return this.readingIds.size;
  }
}

type Sim = {
  probe: FleetProbe;
  zone: string;
  /** The temperature the daily swing runs around: the zone's default, or where its history ended. */
  baseTemp: number;
  topics: ReturnType<typeof probeTopics>;
  scenario: ScenarioName;
  /** Simulated hours since the scenario started. */
  scenarioH: number;
  heatC: number;
  moisture: number;
  ammoniaPpm: number;
  batteryV: number;
  signalBase: number;
  phase: number;
  ticks: number;
  sentFirmware: boolean;
  client: MqttClient | null;
  connecting: boolean;
  store: KeptStore;
  ids: DefaultMessageIdProvider;
  connectedOnce: Promise<void>;
  markConnected: () => void;
};

const round = (x: number, digits: number) => Number(x.toFixed(digits));

/** One SenML pack for one probe at one instant (RFC 8428 §4: bn/bt/bu carried by the first record). */
export function buildPack(
  code: string,
  at: number,
  values: { temperature: number; moisture: number; ammonia?: number; batteryV?: number; signalDbm?: number; firmware?: string },
): unknown[] {
  const pack: Record<string, unknown>[] = [
    { bn: probeBaseName(code), bt: at / 1000, n: "temp", u: "Cel", v: round(values.temperature, 2) },
    { n: "moisture", u: "/100", v: round(values.moisture, 1) },
  ];
  if (values.ammonia !== undefined) pack.push({ n: "nh3", u: "ppm", v: round(values.ammonia, 1) });
  if (values.batteryV !== undefined) pack.push({ n: "battery", u: "V", v: round(values.batteryV, 3) });
  if (values.signalDbm !== undefined) pack.push({ n: "rssi", u: "dBm", v: Math.round(values.signalDbm) });
  if (values.firmware !== undefined) pack.push({ n: "fw", vs: values.firmware });
  return pack;
}

export async function startFleet(opts: FleetOptions): Promise<Fleet> {
  const host = opts.host ?? "127.0.0.1";
  const port = opts.port ?? 18830;
  const intervalMs = opts.intervalMs ?? 60_000;
  const speed = opts.speed ?? 1;
  const firmware = opts.firmware ?? "ww-0.4.2";
  const rnd = prng(opts.seed ?? Date.now());
  let stopped = false;

  const sims: Sim[] = opts.probes.map((probe, i) => {
    const zone = probe.zone ?? "working";
    const base = ZONE_BASE[zone] ?? ZONE_BASE.working!;
    let markConnected = () => {};
    const connectedOnce = new Promise<void>((r) => (markConnected = r));
    const topics = probeTopics(probe.code);
    return {
      probe,
      zone,
      topics,
      baseTemp: probe.last?.temperature ?? base.temp,
      scenario: "steady",
      scenarioH: 0,
      heatC: 0,
      moisture: (probe.last?.moisture ?? base.wet) + rnd.gauss() * 0.5,
      ammoniaPpm: 2,
      batteryV: 3.95 - rnd.next() * 0.1,
      signalBase: -60 - rnd.next() * 20,
      phase: i * 0.7,
      ticks: 0,
      sentFirmware: false,
      client: null,
      connecting: false,
      store: new KeptStore(topics.readings),
      ids: new DefaultMessageIdProvider(),
      connectedOnce,
      markConnected,
    };
  });
  const byCode = new Map(sims.map((s) => [s.probe.code, s]));

  const clientOptions = (s: Sim): IClientOptions => ({
    host,
    port,
    protocol: "mqtt",
    // A fixed client id and a kept session: the broker and this client both keep QoS 1 state.
    clientId: s.probe.code,
    clean: false,
    username: s.probe.code,
    password: s.probe.token,
    keepalive: opts.keepaliveS ?? 30,
    // Retry on purpose, including after a refused CONNACK (the ingest answers "server unavailable"
    // while its database is down, MQTT 3.1.1 §3.2.2.3): a probe in a bin never gives up.
    reconnectPeriod: opts.reconnectPeriodMs ?? 2000,
    reconnectOnConnackError: true,
    connectTimeout: 10_000,
    outgoingStore: s.store,
    messageIdProvider: s.ids,
    will: { topic: s.topics.presence, payload: Buffer.from(PRESENCE_GONE), qos: 1, retain: false },
  });

  const silent = (s: Sim) => s.scenario === "dropout";

  async function connect(s: Sim): Promise<void> {
    if (s.client || s.connecting || stopped) return;
    s.connecting = true;
    while (!stopped && s.scenario !== "dropout") {
      try {
        const client = await connectAsync(clientOptions(s));
        // The scenario may have changed while connecting.
        if (stopped || silent(s)) {
          await client.endAsync(true);
          break;
        }
        client.on("error", (err) => log("%s: %s", s.probe.code, err.message));
        client.on("offline", () => log("%s: connection lost", s.probe.code));
        client.on("reconnect", () => log("%s: reconnecting", s.probe.code));
        client.on("connect", () => {
          log("%s: connected again", s.probe.code);
          announce(s, client);
        });
        s.client = client;
        log("%s: connected", s.probe.code);
        announce(s, client);
        s.markConnected();
        break;
      } catch (err) {
        log("%s: connect refused (%s); trying again", s.probe.code, (err as Error).message);
        await new Promise((r) => setTimeout(r, opts.reconnectPeriodMs ?? 2000));
      }
    }
    s.connecting = false;
  }

  function announce(s: Sim, client: MqttClient) {
    s.sentFirmware = false;
    client.publishAsync(s.topics.presence, PRESENCE_HERE, { qos: 1 }).catch((err: Error) => log('%s: "here" not sent (%s)', s.probe.code, err.message));
  }

  function step(s: Sim, dtH: number) {
    s.scenarioH += dtH;
    if (s.scenario === "heavy-feed" && s.scenarioH <= HEAT_HOURS) {
      s.heatC += HEAT_RATE_C_PER_H * dtH * (1 + rnd.gauss() * 0.1);
      s.ammoniaPpm += 3 * dtH;
    } else {
      s.heatC *= Math.exp(-dtH / COOL_TAU_H);
      s.ammoniaPpm = 2 + (s.ammoniaPpm - 2) * Math.exp(-dtH / COOL_TAU_H);
      if (s.scenario === "heavy-feed" && s.heatC < 0.2) {
        s.scenario = "steady";
        log("%s: heavy feed over, back to steady", s.probe.code);
      }
    }
    const dry = s.scenario === "drying" ? DRY_RATE_DRYING : DRY_RATE_STEADY;
    s.moisture = Math.max(MOISTURE_FLOOR, s.moisture - dry * dtH);
    s.batteryV = Math.max(3.3, s.batteryV - 0.0005 * dtH);
  }

  function reading(s: Sim, at: number) {
    const hourOfDay = (at / 3_600_000) % 24;
    // Warmest mid-afternoon (UTC hours, the same curve as the demo seed's history).
    const swing = DAILY_SWING_C * Math.sin((2 * Math.PI * hourOfDay) / 24 - 2 + s.phase * 0.05);
    return {
      temperature: s.baseTemp + swing + s.heatC + rnd.gauss() * 0.08,
      moisture: Math.min(100, s.moisture + rnd.gauss() * 0.3),
      ammonia: Math.max(0, s.ammoniaPpm + rnd.gauss() * 0.2),
      batteryV: s.batteryV + rnd.gauss() * 0.005,
      signalDbm: Math.max(-120, Math.min(-30, s.signalBase + rnd.gauss() * 2)),
    };
  }

  function publish(s: Sim, at: number, full: boolean) {
    if (!s.client || s.scenario === "dropout") return;
    const r = reading(s, at);
    const pack = buildPack(s.probe.code, at, {
      temperature: r.temperature,
      moisture: r.moisture,
      ammonia: s.probe.metrics === undefined || s.probe.metrics.includes("ammonia") ? r.ammonia : undefined,
      batteryV: full ? r.batteryV : undefined,
      signalDbm: full ? r.signalDbm : undefined,
      firmware: s.sentFirmware ? undefined : firmware,
    });
    s.sentFirmware = true;
    s.ticks += 1;
    // QoS 1: MQTT.js keeps the message in its store until the PUBACK and resends it after a
    // reconnect; the promise is only for logging.
    s.client
      .publishAsync(s.topics.readings, JSON.stringify(pack), { qos: 1 })
      .catch((err: Error) => log("%s: publish pending (%s)", s.probe.code, err.message));
  }

  function tick() {
    const at = Date.now();
    const dtH = (intervalMs / 3_600_000) * speed;
    for (const s of sims) {
      step(s, dtH);
      if (s.scenario === "dropout") continue;
      if (!s.client) void connect(s);
      // Status records: battery and signal with every fifth message, firmware once per connection.
      else publish(s, at, s.ticks % 5 === 0);
    }
  }

  function trigger(code: string, scenario: ScenarioName) {
    const s = byCode.get(code);
    if (!s) throw new Error(`no probe "${code}" in this fleet`);
    if (!SCENARIOS.includes(scenario)) throw new Error(`unknown scenario "${scenario}"; use ${SCENARIOS.join(", ")}`);
    const was = s.scenario;
    s.scenario = scenario;
    s.scenarioH = 0;
    log("%s: scenario %s (was %s)", code, scenario, was);
    if (scenario === "dropout" && s.client) {
      // Gone without a DISCONNECT, as a flat battery would be: the broker publishes the will.
      const c = s.client;
      s.client = null;
      void c.endAsync(true).catch(() => {});
    } else if (was === "dropout" && scenario !== "dropout") {
      void connect(s);
    }
  }

  const initial = opts.scenario ?? "steady";
  for (const [i, s] of sims.entries()) {
    if (initial === "heavy-feed" && s.zone === "fresh") trigger(s.probe.code, "heavy-feed");
    else if (initial === "drying") trigger(s.probe.code, "drying");
    else if (initial === "dropout" && i === sims.length - 1) trigger(s.probe.code, "dropout");
  }

  let control: Server | null = null;
  let controlUrl: string | null = null;
  if (opts.controlPort !== null && opts.controlPort !== undefined) {
    control = controlServer({ trigger, snapshot });
    try {
      await new Promise<void>((resolve, reject) => {
        control!.once("error", reject);
        control!.listen(opts.controlPort!, "127.0.0.1", () => resolve());
      });
      controlUrl = `http://127.0.0.1:${(control.address() as AddressInfo).port}`;
    } catch (err) {
      log("control endpoint not started: %s", (err as Error).message);
      control = null;
    }
  }

  for (const s of sims) if (s.scenario !== "dropout") void connect(s);
  // The first message goes out as soon as a probe is connected, then one per interval.
  for (const s of sims) void s.connectedOnce.then(() => !stopped && s.ticks === 0 && publish(s, Date.now(), true));
  const timer = setInterval(tick, intervalMs);

  function snapshot(): ProbeSnapshot[] {
    return sims.map((s) => ({
      code: s.probe.code,
      zone: s.zone,
      scenario: s.scenario,
      connected: s.client?.connected ?? false,
      acknowledged: s.store.acked,
      unacknowledged: s.store.unacknowledged(),
      temperature: round(reading(s, Date.now()).temperature, 2),
      moisture: round(s.moisture, 1),
      ammonia: round(s.ammoniaPpm, 1),
    }));
  }

  return {
    controlUrl,
    trigger,
    snapshot,
    sent: () => sims.reduce((n, s) => n + s.store.acked, 0),
    pending: () => sims.reduce((n, s) => n + s.store.unacknowledged(), 0),
    ready: async () => {
      await Promise.all(sims.filter((s) => s.scenario !== "dropout").map((s) => s.connectedOnce));
    },
    async stop() {
      if (stopped) return;
      stopped = true;
      clearInterval(timer);
      await Promise.all(
        sims.map(async (s) => {
          const c = s.client;
          s.client = null;
          // No DISCONNECT: a stopped fleet is gone, so the broker publishes each will (MQTT 3.1.1 §3.1.2.5).
          if (c) await c.endAsync(true).catch(() => {});
        }),
      );
      if (control) {
        const c = control;
        await new Promise<void>((r) => c.close(() => r()));
        c.closeAllConnections();
      }
      log("fleet stopped");
    },
  };
}

function controlServer(fleet: { trigger: Fleet["trigger"]; snapshot: Fleet["snapshot"] }): Server {
  return createServer((req, res) => {
    const send = (status: number, body: unknown) => {
      res.writeHead(status, { "content-type": "application/json" });
      res.end(JSON.stringify(body));
    };
    if (req.method === "GET" && req.url === "/probes") return send(200, { probes: fleet.snapshot() });
    if (req.method !== "POST" || req.url !== "/scenario") return send(404, { error: "POST /scenario {code, scenario} or GET /probes" });
    let body = "";
    req.setEncoding("utf8");
    req.on("data", (chunk: string) => {
      body += chunk;
      if (body.length > 4096) req.destroy();
    });
    req.on("end", () => {
      try {
        const { code, scenario } = JSON.parse(body) as { code?: unknown; scenario?: unknown };
        if (typeof code !== "string" || typeof scenario !== "string") return send(400, { error: "give code and scenario as strings" });
        fleet.trigger(code, scenario as ScenarioName);
        send(200, { code, scenario });
      } catch (err) {
        send(400, { error: (err as Error).message });
      }
    });
  });
}

function cliOption(name: string): string | undefined {
  const at = process.argv.indexOf(`--${name}`);
  return at > 0 ? process.argv[at + 1] : undefined;
}

if (process.argv[1] && import.meta.url === pathToFileURL(realpathSync(process.argv[1])).href) {
  const file = cliOption("probes") ?? ".data/demo-probes.json";
  const scenario = (cliOption("scenario") ?? "steady") as ScenarioName;
  if (!SCENARIOS.includes(scenario)) {
    console.error(`unknown scenario "${scenario}"; use ${SCENARIOS.join(", ")}`);
    process.exit(2);
  }
  const probes = JSON.parse(readFileSync(file, "utf8")) as FleetProbe[];
  const fleet = await startFleet({
    probes,
    host: process.env.MQTT_HOST ?? "127.0.0.1",
    port: Number(process.env.MQTT_PORT ?? 18830),
    intervalMs: Number(cliOption("interval-s") ?? 60) * 1000,
    scenario,
    controlPort: Number(cliOption("control-port") ?? 8099),
    speed: Number(cliOption("speed") ?? 1),
  });
  console.log(
    `probe fleet: ${probes.length} probes → mqtt://${process.env.MQTT_HOST ?? "127.0.0.1"}:${process.env.MQTT_PORT ?? 18830}` +
      (fleet.controlUrl ? `; start a scenario with POST ${fleet.controlUrl}/scenario {"code","scenario"}` : ""),
  );
  const stop = () => void fleet.stop().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}
