import { updateMemberRole } from "@/db/queries/team";
import type { Role } from "@/lib/domain/vocabulary";
import type { Who } from "@/lib/server/auth/authorize";
import { memberChanged } from "./member-change";

/** An owner changes a member's role; the farm's last owner stays one (409). */
export async function changeRole(who: Pick<Who, "farmId">, userId: string, role: Role) {
  const member = await memberChanged(userId, (id) => updateMemberRole(who.farmId, id, role), "must stay an owner");
  return member!;
}
