import { createBin } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { defaultZoneKinds, type BinCreate } from "@/lib/domain/validation/farm";

/** An owner adds a bin; its zones are made from the count, from the feeding side to the harvest side. */
export async function addBin(who: Pick<Who, "farmId">, input: BinCreate) {
  const { zoneCount, ...bin } = input;
  return { bin: await createBin(who.farmId, { ...bin, zoneKinds: defaultZoneKinds(zoneCount) }) };
}
