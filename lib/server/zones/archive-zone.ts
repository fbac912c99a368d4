import { archiveZone } from "@/db/queries/bins";

/** An owner archives a zone: it leaves the bin's screens; its readings stay. */
export async function archiveZoneAs(zoneId: string) {
  return { zone: await archiveZone(zoneId) };
}
