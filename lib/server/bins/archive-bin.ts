import { archiveBin } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { binOfFarm } from "./bin-of-farm";

/** An owner archives a bin of their farm: it leaves Today; its readings and logbook stay. */
export async function archiveBinAs(who: Pick<Who, "farmId">, binId: string) {
  const bin = await binOfFarm(who, binId);
  return (await archiveBin(bin.id)) ?? bin;
}
