import { getProbeByCode } from "@/db/queries/probes";
import { recordProbeRefusalThrottled } from "@/db/queries/probes-health";
import type { DoorRefusalCode } from "@/lib/domain/refusal-words";
import type { RejectSource } from "@/lib/domain/vocabulary";

/** One row a minute per probe and kind at most; common practice for a log an outsider can write to. */
export const DOOR_REFUSAL_EVERY_MS = 60_000;

/**
 * A refusal at the door, for the probe's own page: the code named a probe of ours but the token was
 * wrong, or the probe published to a topic that is not its own. Nothing is recorded for an unknown code.
 * For the broker's authenticate and authorizePublish and for POST /api/ingest's bearer check.
 */
export async function recordDoorRefusal(door: RejectSource, code: string, what: DoorRefusalCode, topic: string | null = null): Promise<boolean> {
  const probe = await getProbeByCode(code);
  if (!probe) return false;
  const reason = what === "wrong-token" ? "the token does not match the probe's" : `publish to ${topic ?? "(none)"}, not one of the probe's own topics`;
  return recordProbeRefusalThrottled({ farmId: probe.farmId, probeId: probe.id, source: door, topic, code: what, reason }, DOOR_REFUSAL_EVERY_MS);
}
