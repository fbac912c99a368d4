import type { Who } from "@/lib/server/auth/authorize";
import { binOfFarm } from "./bin-of-farm";
import { editBin } from "./edit-bin";

/** An owner brings an archived bin of their farm back onto Today: PATCH /api/bins/[binId]'s
 * {"archived": false}, for a form that names the farm and the bin apart. */
export async function bringBackBinAs(who: Pick<Who, "farmId" | "role">, binId: string) {
  const bin = await binOfFarm(who, binId);
  return (await editBin(who, bin.id, { fields: {}, bringBack: true })).bin ?? bin;
}
