import { listImports as listFarmImports } from "@/db/queries/imports";
import type { Who } from "@/lib/server/auth/authorize";

/** The farm's logger imports, newest first, with their reports. */
export async function listImports(who: Pick<Who, "farmId">) {
  return { imports: await listFarmImports(who.farmId) };
}
