// Invitations to a farm's team: a random link mailed to the person, stored only as its sha256,
// good for 7 days and for one use.
import createDebug from "debug";
import { getFarm } from "@/db/queries/farms";
import { acceptInvitation, createInvitation, deleteInvitation, getInvitationByTokenHash, isMemberByEmail } from "@/db/queries/team";
import { getUser, getUserByEmail } from "@/db/queries/users";
import type { Invitation, Role } from "@/db/schema";
import { appMailer, escapeHtml } from "@/lib/server/mail/app-mailer";
import { hashPassword } from "@/lib/server/auth/password";
import { hashToken, newLinkToken } from "@/lib/server/auth/tokens";
import { env } from "@/lib/server/env";
import { AppError } from "@/lib/domain/errors";
import { ROLE_WORDS } from "@/lib/domain/team-words";

const log = createDebug("wormward:team");
export const INVITATION_DAYS = 7;

// What the API shows of an invitation: never the token or its hash.
export const publicInvitation = (i: Invitation) => ({ id: i.id, email: i.email, role: i.role, expiresAt: i.expiresAt, createdAt: i.createdAt });

const when = (d: Date, timeZone: string) => d.toLocaleString("en-GB", { timeZone, dateStyle: "long", timeStyle: "short" });

export function invitationMail(p: { farmName: string; inviterName: string; role: Role; link: string; expiresAt: Date; timeZone: string }) {
  const r = ROLE_WORDS[p.role];
  const subject = `[Wormward] ${p.inviterName} invited you to ${p.farmName}`;
  const lead = `${p.inviterName} invited you to join ${p.farmName} on Wormward as ${p.role === "owner" ? "an" : "a"} ${r.name.toLowerCase()} (${r.does}).`;
  const until = `The link works once, until ${when(p.expiresAt, p.timeZone)}.`;
  const ignore = "If you did not expect this, ignore this mail: nothing happens unless the link is opened.";
  const text = `Hello,\n\n${lead}\n\nOpen this link to join:\n${p.link}\n\n${until}\n\n${ignore}\n`;
  const html = `<p>Hello,</p><p>${escapeHtml(lead)}</p><p><a href="${escapeHtml(p.link)}">Join ${escapeHtml(p.farmName)}</a></p><p>${escapeHtml(until)}</p><p>${escapeHtml(ignore)}</p>`;
  return { subject, text, html };
}

export async function inviteToFarm(input: { farmId: string; email: string; role: Role; invitedBy: string }, now = new Date()) {
  if (await isMemberByEmail(input.farmId, input.email)) throw new AppError("conflict", `${input.email} is already on the team.`, "email");
  const mailer = appMailer();
  if (!mailer) throw new AppError("internal", "Mail is not set up on this server, so the invitation cannot be sent.");
  const token = newLinkToken();
  const expiresAt = new Date(now.getTime() + INVITATION_DAYS * 86_400_000);
  const row = await createInvitation({ ...input, tokenHash: hashToken(token), expiresAt });
  const [farm, inviter] = await Promise.all([getFarm(input.farmId), getUser(input.invitedBy)]);
  const mail = invitationMail({
    farmName: farm?.name ?? "a farm",
    inviterName: inviter?.name ?? "An owner",
    role: input.role,
    link: `${env().APP_URL}/join/${token}`,
    expiresAt,
    timeZone: farm?.timezone ?? "UTC",
  });
  try {
    await mailer.send({ to: input.email, ...mail });
  } catch (e) {
    // A link nobody received is of no use: drop it so the owner simply tries again.
    log("invitation %s not sent: %s", row.id, (e as Error).message);
    await deleteInvitation(input.farmId, row.id);
    throw new AppError("internal", "The invitation mail could not be sent; nothing was kept. Try again in a minute.");
  }
  log("invitation %s sent for farm %s", row.id, input.farmId);
  return publicInvitation(row);
}

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

export const INVITATION_REFUSALS = {
  unknown: "This invitation link is not valid. Check that the whole link was copied, or ask the farm's owner for a new one.",
  used: "This invitation has already been used. Sign in to reach the farm.",
  expired: `This invitation has expired (links last ${INVITATION_DAYS} days). Ask the farm's owner to send a new one.`,
} as const;

async function openOrThrow(token: string, now: Date) {
  const found = await lookupInvitation(token, now);
  if (found.state !== "open") throw new AppError(found.state === "unknown" ? "not_found" : "conflict", INVITATION_REFUSALS[found.state]);
  return found;
}

async function take(token: string, joiner: Parameters<typeof acceptInvitation>[1], now: Date) {
  const joined = await acceptInvitation(hashToken(token), joiner, now);
  // Lost a race with another tap, or it expired in between: say which.
  if (!joined) {
    await openOrThrow(token, now);
    throw new AppError("conflict", INVITATION_REFUSALS.used);
  }
  log("user %s joined farm %s as %s", joined.userId, joined.farmId, joined.role);
  return joined;
}

// A person without an account: the invited address becomes their sign-in.
export async function joinWithNewAccount(token: string, input: { name: string; password: string }, now = new Date()) {
  const inv = await openOrThrow(token, now);
  if (inv.hasAccount) throw new AppError("conflict", "An account with this e-mail already exists; sign in to join.");
  const farm = await getFarm(inv.farmId);
  const passwordHash = await hashPassword(input.password);
  const joined = await take(token, { newUser: { email: inv.email, name: input.name, passwordHash, timezone: farm?.timezone ?? "UTC" } }, now);
  return { ...joined, email: inv.email };
}

// A signed-in person joins only with the invitation sent to their own address.
export async function joinAsUser(token: string, userId: string, now = new Date()) {
  const inv = await openOrThrow(token, now);
  const user = await getUser(userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  if (user.email.toLowerCase() !== inv.email.toLowerCase()) {
    throw new AppError("forbidden", `This invitation was sent to ${inv.email}, but you are signed in as ${user.email}. Sign out to accept it.`);
  }
  return take(token, { userId }, now);
}
