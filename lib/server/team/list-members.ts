import { listPendingInvitations, listTeam } from "@/db/queries/team";
import type { Who } from "@/lib/server/auth/authorize";

/** The team as the one asking may see it: every member sees names and roles; owners also see
 * e-mails and the invitations still open. */
export async function listMembers(who: Pick<Who, "farmId" | "role">) {
  const owner = who.role === "owner";
  const [team, pending] = await Promise.all([listTeam(who.farmId), owner ? listPendingInvitations(who.farmId) : null]);
  return {
    members: team.map((m) => ({ userId: m.userId, name: m.name, role: m.role, joinedAt: m.joinedAt, ...(owner ? { email: m.email } : {}) })),
    ...(pending ? { invitations: pending } : {}),
  };
}
