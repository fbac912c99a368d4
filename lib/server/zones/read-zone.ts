import { getZone } from "@/db/queries/bins";

/** One zone. */
export async function readZone(zoneId: string) {
  return { zone: await getZone(zoneId) };
}
