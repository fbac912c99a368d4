import { listPendingInvitations } from "@/db/queries/team";
import type { Who } from "@/lib/server/auth/authorize";

/** The farm's invitations still open (not taken, not expired), oldest first. */
export async function listInvitations(who: Pick<Who, "farmId">) {
  return { invitations: await listPendingInvitations(who.farmId) };
}
