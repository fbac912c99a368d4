import { deleteMember } from "@/db/queries/team";
import type { Who } from "@/lib/server/auth/authorize";
import { memberChanged } from "./member-change";

/** An owner removes a member, themselves included; never the farm's last owner (409). */
export async function removeMember(who: Pick<Who, "farmId">, userId: string) {
  await memberChanged(userId, (id) => deleteMember(who.farmId, id), "cannot be removed");
}
