import { getProbePlace } from "@/db/queries/logbook";

/** What the probe's page shows about it: code, label, where it is placed; null when it is gone. */
export async function probeView(probeId: number) {
  const place = await getProbePlace(probeId);
  return place && { id: place.id, code: place.code, label: place.label, zoneId: place.zoneId, binId: place.binId };
}
