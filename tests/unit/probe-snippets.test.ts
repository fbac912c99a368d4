// The connect snippets of a new probe: what the MicroPython program would publish passes our SenML
// validator for the probe's topic; the commands carry the configured addresses; a stored refusal reads in plain words.
import { describe, expect, it } from "vitest";
import {
  curlCommand,
  examplePayload,
  micropythonProgram,
  mosquittoPubCommand,
  parseBrokerUrl,
  senmlPack,
  shellQuote,
  type PublicAddresses,
} from "@/lib/domain/probe-snippets";
import { REFUSAL_SENTENCES, refusalWords, visibleExcerpt } from "@/lib/domain/refusal-words";
import { summarizeRejections, validateSenmlPayload, type RejectCode } from "@/lib/domain/telemetry";
import { probeTopics } from "@/lib/domain/vocabulary";

const addr: PublicAddresses = {
  mqtt: { host: "worms.example.org", port: 1884, tls: false },
  ingestUrl: "https://worms.example.org/api/ingest",
  loopback: false,
};
const cred = { code: "shed-03", token: "AbCdEfGhIjKlMnOpQrStUvWxYz012345" };
const probe = { id: 7, code: cred.code };

/** A Python assignment of a string constant in the program, read back. */
function constant(program: string, name: string): string {
  const m = new RegExp(`^${name} = (".*")$`, "m").exec(program);
  if (!m) throw new Error(`no ${name} in the program`);
  return JSON.parse(m[1]!) as string;
}

/**
 * The message the program's pack() builds for these inputs: its dict literals are taken from the
 * program text, their names (BASE, t, temp_c, raw) filled in, and the conditional record dropped
 * when the temperature is None, as the program does.
 */
function packOfProgram(program: string, t: number, tempC: number | null, raw: number): unknown[] {
  const body = /^def pack\(t, temp_c, raw\):\n((?: {4}.*\n)+)/m.exec(program)?.[1];
  if (!body) throw new Error("no pack() in the program");
  const dicts = body.match(/\{[^{}]*\}/g) ?? [];
  expect(dicts).toHaveLength(2);
  expect(body).toMatch(/if temp_c is not None:\n {8}recs\.append\(/);
  // Only names in value position (": name," or ": name}"); "moisture-raw" inside a string stays as it is.
  const values: Record<string, string> = { BASE: JSON.stringify(constant(program, "BASE")), t: String(t), temp_c: JSON.stringify(tempC), raw: String(raw) };
  const fill = (d: string) => d.replace(/(:\s*)([A-Za-z_]\w*)(?=\s*[,}])/g, (_m, colon: string, name: string) => colon + (values[name] ?? name));
  const recs = [JSON.parse(fill(dicts[0]!)) as unknown];
  if (tempC !== null) recs.push(JSON.parse(fill(dicts[1]!)) as unknown);
  return recs;
}

describe("the MicroPython program", () => {
  const program = micropythonProgram(addr, cred, 60);
  const now = new Date("2026-12-02T12:00:00Z");
  const t = now.getTime() / 1000 - 30;

  it("builds SenML that our validator accepts for the probe's topic, temperature and raw moisture stored", () => {
    const recs = packOfProgram(program, t, 21.75, 31000);
    // RFC 8428 §4.1: base name and base time on the first record, names and units per record.
    expect(recs).toEqual(senmlPack(cred.code, t, 21.75, 31000));
    expect(constant(program, "TOPIC")).toBe(probeTopics(cred.code).readings);
    const v = validateSenmlPayload(probe, JSON.stringify(recs), { now });
    expect(v.rejections).toEqual([]);
    expect(v.readings.map((r) => [r.metric, r.ts.getTime() / 1000, r.value]).sort()).toEqual([
      ["moisture-raw", t, 31000],
      ["temperature", t, 21.75],
    ]);
  });

  it("leaves out the temperature when the sensor gave none, and the rest is still accepted", () => {
    const recs = packOfProgram(program, t, null, 65535);
    const v = validateSenmlPayload(probe, JSON.stringify(recs), { now });
    expect(v.rejections).toEqual([]);
    expect(v.readings.map((r) => r.metric)).toEqual(["moisture-raw"]);
  });

  it("a pack built for another probe's code is refused for this one (the base name carries the code)", () => {
    const other = micropythonProgram(addr, { ...cred, code: "shed-04" }, 60);
    const v = validateSenmlPayload(probe, JSON.stringify(packOfProgram(other, t, 20, 100)), { now });
    expect(v.readings).toEqual([]);
    expect(v.rejections.map((r) => r.code)).toEqual(["wrong-probe", "wrong-probe"]);
  });

  it("uses the configured broker and the probe's credentials, publishes at QoS 1 and keeps unsent readings", () => {
    expect(constant(program, "BROKER")).toBe("worms.example.org");
    expect(program).toMatch(/^PORT = 1884$/m);
    expect(program).not.toContain("127.0.0.1");
    expect(constant(program, "CODE")).toBe(cred.code);
    expect(constant(program, "TOKEN")).toBe(cred.token);
    expect(program).toMatch(/MQTTClient\(CODE, BROKER, port=PORT, user=CODE, password=TOKEN/);
    expect(program).toMatch(/client\.publish\(TOPIC, json\.dumps\(queue\[0\]\), qos=1\)[^\n]*\n\s+queue\.pop\(0\)/);
    expect(program).toContain("import json, time, machine, network, ntptime, onewire, ds18x20");
    expect(program).toMatch(/^EVERY_S = 60$/m);
    expect(micropythonProgram({ ...addr, mqtt: { ...addr.mqtt, tls: true } }, cred, 60)).toContain("ssl=True");
  });
});

describe("the commands", () => {
  it("mosquitto_pub names the configured broker, the probe's credentials and topic, QoS 1, and an accepted payload", () => {
    const cmd = mosquittoPubCommand(addr, cred);
    expect(cmd).toBe(
      `mosquitto_pub -h worms.example.org -p 1884 -i shed-03:try -u shed-03 -P ${cred.token} -q 1 -t wormward/shed-03/readings -m ${shellQuote(examplePayload(cred.code))}`,
    );
    const v = validateSenmlPayload(probe, examplePayload(cred.code));
    expect(v.rejections).toEqual([]);
    expect(v.readings.map((r) => [r.metric, r.value])).toEqual([["temperature", 21.5]]);
  });

  it("curl posts SenML JSON to the configured ingest URL with the probe's bearer", () => {
    const cmd = curlCommand(addr, cred);
    expect(cmd).toContain("https://worms.example.org/api/ingest");
    expect(cmd).toContain(`'Authorization: Bearer shed-03.${cred.token}'`);
    // RFC 8428 §6: the media type of SenML JSON.
    expect(cmd).toContain("'Content-Type: application/senml+json'");
  });

  it("shell quoting keeps a quote inside one word", () => {
    expect(shellQuote(`it's`)).toBe(`'it'\\''s'`);
    expect(shellQuote("plain-word_1.2")).toBe("plain-word_1.2");
  });

  it("reads broker URLs, with the IANA ports by default", () => {
    expect(parseBrokerUrl("mqtt://broker.example.org")).toEqual({ host: "broker.example.org", port: 1883, tls: false });
    expect(parseBrokerUrl("mqtts://broker.example.org")).toEqual({ host: "broker.example.org", port: 8883, tls: true });
    expect(parseBrokerUrl("mqtt://10.0.0.5:18830")).toEqual({ host: "10.0.0.5", port: 18830, tls: false });
    expect(parseBrokerUrl("http://broker.example.org")).toBeNull();
  });
});

describe("a refusal in plain words", () => {
  const now = new Date("2026-12-02T12:00:00Z");
  const t = now.getTime() / 1000;
  const bn = "urn:dev:wormward:shed-03:";
  // Payloads the ingest refuses, each for one reason; the stored text is what the ingest would store.
  const cases: [RejectCode, string][] = [
    ["malformed-json", "{not json"],
    ["malformed-senml", JSON.stringify({ bn, n: "temp" })],
    ["unknown-metric", JSON.stringify([{ bn, bt: t, n: "pressure", u: "Pa", v: 1 }])],
    ["bad-unit", JSON.stringify([{ bn, bt: t, n: "temp", u: "C", v: 20 }])],
    ["wrong-probe", JSON.stringify([{ bn: "urn:dev:wormward:other:", bt: t, n: "temp", u: "Cel", v: 20 }])],
    ["out-of-range", JSON.stringify([{ bn, bt: t, n: "temp", u: "Cel", v: 300 }])],
    ["sensor-error", JSON.stringify([{ bn, bt: t, n: "temp", u: "Cel", v: 85 }])],
    ["too-far-ahead", JSON.stringify([{ bn, bt: t + 3600, n: "temp", u: "Cel", v: 20 }])],
    ["too-old", JSON.stringify([{ bn, bt: t - 90 * 86400, n: "temp", u: "Cel", v: 20 }])],
  ];
  it.each(cases)("%s reads as its own sentence", (code, payload) => {
    const v = validateSenmlPayload(probe, payload, { now });
    const stored = summarizeRejections(v.rejections)!.reason;
    const words = refusalWords(stored);
    expect(words.sentence).toBe(REFUSAL_SENTENCES[code]);
    expect(words.details[0]).toMatch(new RegExp(`^${code}: `));
  });

  it("every refusal code has a sentence of its own", () => {
    const sentences = Object.values(REFUSAL_SENTENCES);
    expect(new Set(sentences).size).toBe(sentences.length);
  });

  it("a reason of an unknown kind still reads as a refusal", () => {
    expect(refusalWords("something new: details").sentence).toBe("The message was refused.");
  });

  it("the first bytes show control characters escaped", () => {
    expect(visibleExcerpt("a\u0000b\nc\u001b[2J\ufffd")).toBe("a\\x00b\\x0ac\\x1b[2J\\ufffd");
    expect(visibleExcerpt(null)).toBeNull();
  });
});
