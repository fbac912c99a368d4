import { getBin } from "@/db/queries/bins";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";

/** The bin, when it is on the farm the caller was authorized for: a form names the farm and the bin
 * apart, and another farm's bin answers as if it did not exist. */
export async function binOfFarm(who: Pick<Who, "farmId">, binId: string) {
  const bin = await getBin(binId);
  if (!bin || bin.farmId !== who.farmId) throw new AppError("not_found", "That bin is not on this farm.");
  return bin;
}
