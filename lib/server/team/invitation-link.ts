// What an invitation link is worth when it is opened, and taking it: shared by the join page and
// both ways of joining. A link is good for INVITATION_DAYS days and for one use.
import createDebug from "debug";
import { acceptInvitation, getInvitationByTokenHash } from "@/db/queries/team";
import { getUserByEmail } from "@/db/queries/users";
import type { Role } from "@/lib/domain/vocabulary";
import { hashToken } from "@/lib/server/auth/tokens";
import { AppError } from "@/lib/domain/errors";

const log = createDebug("wormward:team");
export const INVITATION_DAYS = 7;

export const INVITATION_REFUSALS = {
  unknown: "This invitation link is not valid. Check that the whole link was copied, or ask the farm's owner for a new one.",
  used: "This invitation has already been used. Sign in to reach the farm.",
  expired: `This invitation has expired (links last ${INVITATION_DAYS} days). Ask the farm's owner to send a new one.`,
} as const;

export const EMAIL_HAS_ACCOUNT = "An account with this e-mail already exists; sign in to join.";

export type InvitationLookup =
  | { state: "unknown" | "used" | "expired" }
  | { state: "open"; farmId: string; farmName: string; email: string; role: Role; invitedByName: string | null; expiresAt: Date; hasAccount: boolean };

export async function lookupInvitation(token: string, now = new Date()): Promise<InvitationLookup> {
  const r = await getInvitationByTokenHash(hashToken(token));
  if (!r) return { state: "unknown" };
  if (r.invitation.acceptedAt) return { state: "used" };
  if (r.invitation.expiresAt <= now) return { state: "expired" };
  const { invitation: i } = r;
  return {
    state: "open",
    farmId: i.farmId,
    farmName: r.farmName,
    email: i.email,
    role: i.role,
    invitedByName: r.invitedByName,
    expiresAt: i.expiresAt,
    hasAccount: !!(await getUserByEmail(i.email)),
  };
}

/** The open invitation behind a link; an unknown link is 404, a used or expired one 409. */
export async function openInvitation(token: string, now: Date) {
  const found = await lookupInvitation(token, now);
  if (found.state !== "open") throw new AppError(found.state === "unknown" ? "not_found" : "conflict", INVITATION_REFUSALS[found.state]);
  return found;
}

export async function takeInvitation(token: string, joiner: Parameters<typeof acceptInvitation>[1], now: Date) {
  const r = await acceptInvitation(hashToken(token), joiner, now);
  if ("refused" in r) {
    if (r.refused === "email_taken") throw new AppError("conflict", EMAIL_HAS_ACCOUNT);
    // Lost a race with another tap, or it expired in between: say which.
    await openInvitation(token, now);
    throw new AppError("conflict", INVITATION_REFUSALS.used);
  }
  log("user %s joined farm %s as %s", r.joined.userId, r.joined.farmId, r.joined.role);
  return r.joined;
}
