import { getFarm } from "@/db/queries/farms";
import { listFarmProbes, listImports } from "@/db/queries/imports";
import type { Who } from "@/lib/server/auth/authorize";

/** The import page: the farm, its import history, and for an owner the probes a file may name;
 * null when the farm is gone. */
export async function importsView(who: Pick<Who, "farmId" | "role">) {
  const [farm, history, probes] = await Promise.all([
    getFarm(who.farmId),
    listImports(who.farmId),
    who.role === "owner" ? listFarmProbes(who.farmId) : Promise.resolve([]),
  ]);
  return farm && { farm: { name: farm.name, timezone: farm.timezone }, history, probes: probes.map((p) => ({ code: p.code, label: p.label })) };
}
