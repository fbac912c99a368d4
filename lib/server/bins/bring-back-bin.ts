import { updateBin } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { binOfFarm } from "./bin-of-farm";

/** An owner brings an archived bin of their farm back onto Today. */
export async function bringBackBinAs(who: Pick<Who, "farmId">, binId: string) {
  const bin = await binOfFarm(who, binId);
  return (await updateBin(bin.id, { archivedAt: null })) ?? bin;
}
