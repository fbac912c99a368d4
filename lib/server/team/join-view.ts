import { getUser } from "@/db/queries/users";
import { lookupInvitation } from "./invitation-link";

/** What the join page shows: the state of the link and, while it is open, who is signed in if
 * anyone (the page offers joining as them only when the addresses match). */
export async function joinView(token: string, userId: string | null) {
  const invitation = await lookupInvitation(token);
  const me = invitation.state === "open" && userId ? await getUser(userId) : null;
  return { ...invitation, signedInAs: me?.email ?? null };
}
