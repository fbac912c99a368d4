import { getFarm } from "@/db/queries/farms";
import type { Who } from "@/lib/server/auth/authorize";
import { listMembers } from "./list-members";

/** The team page: the farm's name and time zone with the team as the one asking may see it; null
 * when the farm is gone. */
export async function teamView(who: Pick<Who, "farmId" | "role">) {
  const [farm, team] = await Promise.all([getFarm(who.farmId), listMembers(who)]);
  return farm && { farm: { name: farm.name, timezone: farm.timezone }, members: team.members, invitations: team.invitations ?? [] };
}
