import { getFarm } from "@/db/queries/farms";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";

/** The farm the caller was authorized for, and their role on it. */
export async function readFarm(who: Pick<Who, "farmId" | "role">) {
  const farm = await getFarm(who.farmId);
  // Only when the farm was deleted between the role check and this read.
  if (!farm) throw new AppError("not_found", "Not found.");
  return { farm, role: who.role };
}
