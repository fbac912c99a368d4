// What an owner copies to connect a probe: a mosquitto_pub command, a curl command for the HTTP
// ingest and a short MicroPython program for an ESP32-class Wi-Fi board. Each is built from the
// probe's code and token and the broker address and ingest URL of the configuration, and each
// sends SenML (RFC 8428) named as lib/domain/metrics.ts reads it: base name
// "urn:dev:wormward:<code>:", names "temp" (unit "Cel") and "moisture-raw" (unit "count").
import { probeBaseName } from "./metrics";
import { probeTopics } from "./vocabulary";

/** Where probes reach us, as the configuration says (lib/server/env.ts). */
export type PublicAddresses = {
  mqtt: { host: string; port: number; tls: boolean };
  /** The full URL of POST /api/ingest. */
  ingestUrl: string;
  /** Whether an address is this machine's own (loopback): a probe elsewhere cannot reach it. */
  loopback: boolean;
};

export type ProbeCredentials = { code: string; token: string };

/** A broker URL ("mqtt://host:1883", "mqtts://host:8883") as host, port and whether it is TLS. */
export function parseBrokerUrl(url: string): { host: string; port: number; tls: boolean } | null {
  let u: URL;
  try {
    u = new URL(url);
  } catch {
    return null;
  }
  const tls = u.protocol === "mqtts:";
  if (!tls && u.protocol !== "mqtt:") return null;
  if (!u.hostname) return null;
  // 1883 and 8883: the IANA ports for MQTT and MQTT over TLS.
  const port = u.port ? Number(u.port) : tls ? 8883 : 1883;
  return { host: u.hostname.replace(/^\[(.*)\]$/, "$1"), port, tls };
}

const LOOPBACK = /^(localhost|127(\.\d{1,3}){3}|::1)$/i;
export const isLoopbackHost = (host: string) => LOOPBACK.test(host);

/** POSIX shell single quotes: the text as one word, nothing in it expanded. */
export const shellQuote = (s: string) => (/^[A-Za-z0-9._\/:@%+=,-]+$/.test(s) ? s : `'${s.replace(/'/g, `'\\''`)}'`);

/** One example reading with no time: SenML takes a record without a time as "now" (RFC 8428 §4.5.3). */
export function examplePayload(code: string): string {
  return JSON.stringify([{ bn: probeBaseName(code), n: "temp", u: "Cel", v: 21.5 }]);
}

/** A test publish with Debian's mosquitto_pub, QoS 1 so it returns after the broker has stored it. */
export function mosquittoPubCommand(addr: PublicAddresses, p: ProbeCredentials): string {
  const { host, port, tls } = addr.mqtt;
  return [
    "mosquitto_pub",
    "-h",
    shellQuote(host),
    "-p",
    String(port),
    ...(tls ? ["--capath", "/etc/ssl/certs"] : []),
    // The client id must be the probe code or "<code>:<suffix>"; a suffix keeps the board's own connection open.
    "-i",
    shellQuote(`${p.code}:try`),
    "-u",
    shellQuote(p.code),
    "-P",
    shellQuote(p.token),
    "-q",
    "1",
    "-t",
    shellQuote(probeTopics(p.code).readings),
    "-m",
    shellQuote(examplePayload(p.code)),
  ].join(" ");
}

/** A test post to the HTTP ingest: bearer "<code>.<token>", SenML JSON (RFC 8428 §6). */
export function curlCommand(addr: PublicAddresses, p: ProbeCredentials): string {
  return [
    "curl",
    "-sS",
    "--fail-with-body",
    "-X",
    "POST",
    shellQuote(addr.ingestUrl),
    "-H",
    shellQuote(`Authorization: Bearer ${p.code}.${p.token}`),
    "-H",
    shellQuote("Content-Type: application/senml+json"),
    "--data",
    shellQuote(examplePayload(p.code)),
  ].join(" ");
}

/** Python's own string literal for a text (JSON's escapes are valid in Python for what we put in). */
const py = (s: string) => JSON.stringify(s);

/**
 * A MicroPython program (umqtt.simple, onewire, ds18x20, machine.ADC) for an ESP32-class board:
 * a DS18B20 on GPIO 4, a capacitive moisture sensor on ADC GPIO 34. It takes a reading every
 * report interval, keeps it in memory until the broker has acknowledged it (QoS 1 publish), and
 * reconnects after any failure. The records are built in `pack()` in the shape `senmlPack` gives.
 */
export function micropythonProgram(addr: PublicAddresses, p: ProbeCredentials, reportIntervalS: number): string {
  const t = probeTopics(p.code);
  const { host, port, tls } = addr.mqtt;
  return `# Wormward probe ${p.code}: DS18B20 + capacitive moisture sensor, SenML over MQTT.
import json, time, machine, network, ntptime, onewire, ds18x20
from umqtt.simple import MQTTClient

WIFI_NAME = "your-wifi-name"
WIFI_PASSWORD = "your-wifi-password"
BROKER = ${py(host)}
PORT = ${port}
CODE = ${py(p.code)}
TOKEN = ${py(p.token)}
TOPIC = ${py(t.readings)}
PRESENCE = ${py(t.presence)}
BASE = ${py(probeBaseName(p.code))}
EVERY_S = ${reportIntervalS}
KEEP = 500  # readings held while the broker cannot be reached; the oldest go first

ds = ds18x20.DS18X20(onewire.OneWire(machine.Pin(4)))
adc = machine.ADC(machine.Pin(34))
adc.atten(machine.ADC.ATTN_11DB)
# Some ports count time from 2000-01-01, SenML from 1970-01-01.
UNIX = 946684800 if time.gmtime(0)[0] == 2000 else 0

def wifi():
    w = network.WLAN(network.STA_IF)
    w.active(True)
    if not w.isconnected():
        w.connect(WIFI_NAME, WIFI_PASSWORD)
        while not w.isconnected():
            time.sleep(1)

def read_temp():
    try:
        roms = ds.scan()
        ds.convert_temp()
        time.sleep_ms(750)
        c = ds.read_temp(roms[0])
        return None if c in (85.0, -127.0) else round(c, 2)
    except Exception:
        return None

def pack(t, temp_c, raw):
    recs = [{"bn": BASE, "bt": t, "n": "moisture-raw", "u": "count", "v": raw}]
    if temp_c is not None:
        recs.append({"n": "temp", "u": "Cel", "v": temp_c})
    return recs

def connect():
    c = MQTTClient(CODE, BROKER, port=PORT, user=CODE, password=TOKEN, keepalive=60${tls ? ", ssl=True" : ""})
    c.set_last_will(PRESENCE, b"gone", qos=1)
    c.connect()
    c.publish(PRESENCE, b"here", qos=1)
    return c

wifi()
while True:
    try:
        ntptime.settime()
        break
    except Exception:
        time.sleep(5)

queue = []
client = None
while True:
    queue.append(pack(time.time() + UNIX, read_temp(), adc.read_u16()))
    del queue[:-KEEP]
    try:
        wifi()
        if client is None:
            client = connect()
        while queue:
            client.publish(TOPIC, json.dumps(queue[0]), qos=1)  # returns once acknowledged
            queue.pop(0)
    except Exception:
        try:
            client.disconnect()
        except Exception:
            pass
        client = None
    time.sleep(EVERY_S)
`;
}

/** The records `pack()` of the MicroPython program builds, for the same inputs (a port kept beside it). */
export function senmlPack(code: string, t: number, tempC: number | null, raw: number): object[] {
  const recs: object[] = [{ bn: probeBaseName(code), bt: t, n: "moisture-raw", u: "count", v: raw }];
  if (tempC !== null) recs.push({ n: "temp", u: "Cel", v: tempC });
  return recs;
}

export type ProbeSnippets = { mosquittoPub: string; curl: string; micropython: string };

export function probeSnippets(addr: PublicAddresses, p: ProbeCredentials, reportIntervalS: number): ProbeSnippets {
  return { mosquittoPub: mosquittoPubCommand(addr, p), curl: curlCommand(addr, p), micropython: micropythonProgram(addr, p, reportIntervalS) };
}
