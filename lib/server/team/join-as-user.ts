import { getUser } from "@/db/queries/users";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { openInvitation, takeInvitation } from "./invitation-link";

/** A signed-in person joins only with the invitation sent to their own address. */
export async function joinAsUser(who: Pick<Who, "userId">, token: string, now = new Date()) {
  const inv = await openInvitation(token, now);
  const user = await getUser(who.userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  if (user.email.toLowerCase() !== inv.email.toLowerCase()) {
    throw new AppError("forbidden", `This invitation was sent to ${inv.email}, but you are signed in as ${user.email}. Sign out to accept it.`);
  }
  return takeInvitation(token, { userId: who.userId }, now);
}
