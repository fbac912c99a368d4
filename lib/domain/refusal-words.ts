// A refused message as an owner reads it: the ingest stores each reason as "<code>: <details>",
// one a line (lib/domain/telemetry.ts rejectionText); here each code becomes a plain sentence that
// says what went wrong and what to change on the probe.
import type { RejectCode } from "./telemetry";
import { probeTopics } from "./vocabulary";

/** Refusals at the door, recorded for a known probe by lib/server/probes/record-door-refusal.ts. */
export type DoorRefusalCode = "wrong-token" | "wrong-topic";

export const REFUSAL_SENTENCES: Record<RejectCode | DoorRefusalCode, string> = {
  "wrong-token":
    "Wrong token: the probe's code is known but its token is not the one given when it was registered. Copy the token again, or give it a new one.",
  "wrong-topic": `Wrong topic: the probe published to a topic that is not its own. It publishes readings to ${probeTopics("<its code>").readings}.`,
  "too-large": "The message was too large. Send fewer readings in each message.",
  "malformed-json": "The message was not JSON text. Send a SenML list of records, such as the example.",
  "malformed-senml": "A SenML record is malformed: the message is JSON but not a list of records with names and values like the example.",
  "unknown-metric": "A record names a measurement Wormward does not know. Use temp, moisture, moisture-raw, nh3, battery, rssi or fw after the base name.",
  "bad-unit": 'A record has the wrong unit for its measurement, such as °C sent as "C" instead of "Cel".',
  "wrong-probe": "A record names another probe: the base name must hold this probe's own code.",
  "out-of-range": "A value is outside what the sensor can measure. Check the sensor's wiring.",
  "sensor-error": "The sensor sent its error code instead of a reading (a DS18B20 says 85 °C before its first conversion). Check the wiring.",
  "too-far-ahead": "A reading is timed more than a few minutes in the future. Set the probe's clock (NTP).",
  "too-old": "A reading is timed too long ago. Set the probe's clock (NTP), or send times in seconds since 1970.",
  "bad-presence": 'A presence message said something other than "here" or "gone".',
  retained: "The message was published with the retain flag. Publish readings without it.",
};

export type RefusalWords = {
  /** The sentence for the first reason. */
  sentence: string;
  /** Every stored reason line, as the ingest wrote it, for whoever fixes the probe. */
  details: string[];
};

const isCode = (s: string): s is RejectCode | DoorRefusalCode => Object.hasOwn(REFUSAL_SENTENCES, s);

/** The plain sentence for a stored reason (its first line's code), and its lines. */
export function refusalWords(reason: string): RefusalWords {
  const details = reason.split("\n").filter((l) => l.trim() !== "");
  const first = details[0] ?? "";
  const code = first.slice(0, Math.max(0, first.indexOf(":")));
  return {
    sentence: isCode(code) ? REFUSAL_SENTENCES[code] : "The message was refused.",
    details,
  };
}

/** The first bytes of a refused message shown as text: control characters as \xNN, so nothing in it acts on the screen. */
export function visibleExcerpt(excerpt: string | null): string | null {
  if (excerpt === null) return null;
  return excerpt.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029\ufffd]/g, (ch) => {
    if (ch === "\ufffd") return "\\ufffd";
    const n = ch.charCodeAt(0);
    return n > 0xff ? `\\u${n.toString(16).padStart(4, "0")}` : `\\x${n.toString(16).padStart(2, "0")}`;
  });
}
