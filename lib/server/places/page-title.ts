import { getBin, getZone } from "@/db/queries/bins";

// What a browser tab says for a bin or a zone, so a keeper with several tabs open can tell them
// apart. The caller has authorized the person for the bin or zone first.

/** The bin's own name. */
export async function binTitle(binId: string): Promise<string> {
  return (await getBin(binId))?.name ?? "Bin";
}

/** The zone's name (or its kind) and its bin's name: "Fresh zone · Long Bed North". */
export async function zoneTitle(zoneId: string): Promise<string> {
  const zone = await getZone(zoneId);
  if (!zone) return "Zone";
  const bin = await getBin(zone.binId);
  const name = zone.name ?? `${zone.kind[0]!.toUpperCase()}${zone.kind.slice(1)} zone`;
  return bin ? `${name} · ${bin.name}` : name;
}
