// Telemetry for probes that cannot speak MQTT: a message posted over HTTP (lib/web/api/senml-body.ts
// reads it, lib/web/probe-auth.ts names the probe) goes through the same validation as MQTT and is
// stored in one transaction.
import { storeMessage } from "@/db/queries/telemetry";
import type { Probe } from "@/db/schema";
import { AppError } from "@/lib/domain/errors";
import { excerptOf, rejectionText, summarizeRejections, validateSenmlPayload, type Rejection, type ValidatedPayload } from "@/lib/domain/telemetry";

/** A posted message as read under the cap: its bytes, or the words for a body refused for its size. */
export type PostedMessage = { bytes: Buffer } | { tooLarge: string };

/** A message refused whole (not JSON, not a SenML pack) rather than record by record. */
function refusedWhole(v: ValidatedPayload): boolean {
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
const ANSWERED_REJECTIONS = 20;

/**
 * Validates one posted message like an MQTT one and stores it. A body over the cap is recorded as
 * a rejection (as the MQTT ingest records one) and refused with 413; a message refused whole with 400.
 */
export async function acceptHttpTelemetry(probe: Probe, posted: PostedMessage, now = new Date()): Promise<HttpIngestResult> {
  const origin = { farmId: probe.farmId, probeId: probe.id, source: "http" as const, topic: null };
  if ("tooLarge" in posted) {
    const reason = rejectionText({ code: "too-large", reason: posted.tooLarge });
    await storeMessage({ readings: [], rejections: [{ ...origin, excerpt: null, reason }], status: null });
    throw new AppError("too_large", posted.tooLarge);
  }
  const v = validateSenmlPayload(probe, posted.bytes, { now });
  const refused = summarizeRejections(v.rejections);
  const { inserted } = await storeMessage({
    readings: v.readings,
    rejections: refused ? [{ ...origin, excerpt: excerptOf(posted.bytes), ...refused }] : [],
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
