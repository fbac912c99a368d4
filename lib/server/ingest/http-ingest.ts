// The HTTP side of telemetry for probes that cannot speak MQTT: who is posting (a bearer
// credential), what they post (SenML JSON, RFC 8428 §6), and how much (read with a cap, so a large
// body is refused without being held). Storing goes through the same validation as MQTT.
import { storeMessage } from "@/db/queries/telemetry";
import type { Probe } from "@/db/schema";
import { capWords, mediaType, readCappedBody } from "../../web/api/body";
import { AppError } from "../../web/errors";
import { excerptOf, rejectionText, summarizeRejections, validateSenmlPayload, type Rejection, type ValidatedPayload } from "../../domain/telemetry";

export const SENML_JSON = "application/senml+json";

/**
 * `Authorization: Bearer <code>.<token>` — RFC 6750 §2.1's b64token has no ":", so the code and
 * token are joined by "." and split at the last one (tokens are base64url, without "."; codes may
 * hold "."). `Bearer <code>:<token>` is accepted too, split at the first ":" (codes cannot hold ":").
 */
export function parseProbeBearer(header: string | null): { code: string; token: string } | null {
  const m = /^Bearer +(\S+) *$/i.exec(header ?? "");
  if (!m) return null;
  const cred = m[1]!;
  const colon = cred.indexOf(":");
  const at = colon >= 0 ? colon : cred.lastIndexOf(".");
  if (at <= 0 || at === cred.length - 1) return null;
  return { code: cred.slice(0, at), token: cred.slice(at + 1) };
}

export function requireSenmlJson(headers: Headers): void {
  const type = mediaType(headers.get("content-type"));
  if (type !== SENML_JSON) {
    throw new AppError("unsupported_media", `Send SenML JSON with Content-Type: ${SENML_JSON} (RFC 8428 §6)${type ? `, not ${type}` : ""}.`);
  }
  const coding = (headers.get("content-encoding") ?? "identity").trim().toLowerCase();
  if (coding !== "identity") throw new AppError("unsupported_media", `Content-Encoding ${coding} is not accepted; send the body as it is.`);
}

/** A message refused whole (not JSON, not a SenML pack) rather than record by record. */
export function refusedWhole(v: ValidatedPayload): boolean {
  return v.readings.length === 0 && v.rejections.some((r) => r.whole);
}

export type HttpIngestResult = {
  /** New rows stored. */
  stored: number;
  /** Readings already stored before (a resent message): a no-op. */
  duplicates: number;
  rejected: number;
  /** The first ANSWERED_REJECTIONS; `rejected` counts them all. */
  rejections: Rejection[];
};

// A pack of thousands of bad records is answered with a few of them, not an echo larger than itself.
export const ANSWERED_REJECTIONS = 20;

/** Validates one posted message like an MQTT one and stores it; throws 400 for a message refused whole. */
export async function acceptHttpTelemetry(probe: Probe, body: Buffer, now = new Date()): Promise<HttpIngestResult> {
  const v = validateSenmlPayload(probe, body, { now });
  const origin = { farmId: probe.farmId, probeId: probe.id, source: "http" as const, topic: null };
  const refused = summarizeRejections(v.rejections);
  const { inserted } = await storeMessage({
    readings: v.readings,
    rejections: refused ? [{ ...origin, excerpt: excerptOf(body), ...refused }] : [],
    status: { probeId: probe.id, ...v.status },
  });
  if (refusedWhole(v)) throw new AppError("bad_request", `Nothing stored: ${v.rejections[0]!.reason}.`);
  return {
    stored: inserted,
    duplicates: v.readings.length - inserted,
    rejected: v.rejections.length,
    rejections: v.rejections.slice(0, ANSWERED_REJECTIONS),
  };
}

/** Reads a probe's message with the MQTT cap; a larger one is recorded as a rejection and refused with 413. */
export async function readTelemetryBody(req: Request, probe: Probe, max: number): Promise<Buffer> {
  const body = await readCappedBody(req, max);
  if (body.ok) return body.bytes;
  const message = `The body is ${body.size}; at most ${capWords(max)} are accepted.`;
  await recordTooLarge(probe, message);
  throw new AppError("too_large", message);
}

/** Records a body refused for its size before it was read (the MQTT ingest records the same). */
async function recordTooLarge(probe: Probe, reason: string): Promise<void> {
  await storeMessage({
    readings: [],
    rejections: [{ farmId: probe.farmId, probeId: probe.id, source: "http", topic: null, excerpt: null, reason: rejectionText({ code: "too-large", reason }) }],
    status: null,
  });
}
