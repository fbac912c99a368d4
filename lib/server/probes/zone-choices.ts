import { zoneInBin } from "@/lib/domain/zone-words";
import { listBins } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";

/** The zones a probe may be placed in, labelled "<bin> · <zone>", for the probes page's picker. */
export async function zoneChoices(who: Pick<Who, "farmId">) {
  const bins = await listBins(who.farmId);
  return bins.flatMap((b) => b.zones.map((z) => ({ id: z.id, label: zoneInBin(b.name, z, " · ") })));
}
