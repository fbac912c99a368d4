import { getProbePlace, insertSample, nearestRawReading } from "@/db/queries/logbook";
import type { Who } from "@/lib/server/auth/authorize";
import { moistureWetBasis } from "@/lib/domain/calibration";
import { AppError } from "@/lib/domain/errors";
import type { SampleCreate } from "@/lib/domain/validation/log-entries";

/** Records an oven-dry sample taken beside the probe, with its wet-basis moisture and the probe's raw
 * reading. A clientKey the farm used before answers the sample stored then (`created` false). */
export async function addSample(who: Pick<Who, "farmId" | "userId">, probeId: number, input: SampleCreate & { clientKey?: string }) {
  const place = await getProbePlace(probeId);
  if (!place?.binId) throw new AppError("invalid", "Place the probe in a zone of a bin before sampling beside it.", "probeId");
  const wb = moistureWetBasis({ wetMassG: input.wetMassG, dryMassG: input.dryMassG, tareG: input.tareG });
  if (!wb.ok) throw new AppError("invalid", wb.error.message, wb.error.field);
  const at = input.at ?? new Date();
  // When the keeper did not read the probe, take what it reported nearest the sampling time.
  const raw = input.rawReading ?? (await nearestRawReading(probeId, at))?.value ?? null;
  const { row: sample, created } = await insertSample({
    farmId: who.farmId,
    binId: place.binId,
    zoneId: place.zoneId,
    probeId,
    at,
    byUserId: who.userId,
    notes: input.notes ?? null,
    wetMassG: input.wetMassG,
    dryMassG: input.dryMassG,
    tareG: input.tareG ?? 0,
    ovenTempC: input.ovenTempC ?? null,
    rawReading: raw,
    moistureWbPct: wb.value,
    clientKey: input.clientKey ?? null,
  });
  // A replay under a stored key is said of the stored sample, as the first request said it.
  const given = created ? input.rawReading != null : input.rawReading != null && input.rawReading === sample.rawReading;
  const rawFrom = given ? "given" : sample.rawReading != null ? "probe" : "none";
  return { answer: { sample, rawFrom }, created };
}
