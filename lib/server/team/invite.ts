// An owner invites someone by e-mail: a random link mailed to the person, stored only as its
// sha256, good for INVITATION_DAYS days and for one use.
import createDebug from "debug";
import { getFarm } from "@/db/queries/farms";
import { createInvitation, deleteInvitation, isMemberByEmail } from "@/db/queries/team";
import { getUser } from "@/db/queries/users";
import type { Invitation } from "@/db/schema";
import type { Role } from "@/lib/domain/vocabulary";
import type { Who } from "@/lib/server/auth/authorize";
import { appMailer, escapeHtml } from "@/lib/server/mail/app-mailer";
import { hashToken, newLinkToken } from "@/lib/server/auth/tokens";
import { env } from "@/lib/server/env";
import { AppError } from "@/lib/domain/errors";
import { ROLE_WORDS } from "@/lib/domain/team-words";
import type { InvitationCreate } from "@/lib/domain/validation/team";
import { INVITATION_DAYS } from "./invitation-link";

const log = createDebug("wormward:team");

// What the API shows of an invitation: never the token or its hash.
const publicInvitation = (i: Invitation) => ({ id: i.id, email: i.email, role: i.role, expiresAt: i.expiresAt, createdAt: i.createdAt });

const when = (d: Date, timeZone: string) => d.toLocaleString("en-GB", { timeZone, dateStyle: "long", timeStyle: "short" });

function invitationMail(p: { farmName: string; inviterName: string; role: Role; link: string; expiresAt: Date; timeZone: string }) {
  const r = ROLE_WORDS[p.role];
  const subject = `[Wormward] ${p.inviterName} invited you to ${p.farmName}`;
  const lead = `${p.inviterName} invited you to join ${p.farmName} on Wormward as ${p.role === "owner" ? "an" : "a"} ${r.name.toLowerCase()} (${r.does}).`;
  const until = `The link works once, until ${when(p.expiresAt, p.timeZone)}.`;
  const ignore = "If you did not expect this, ignore this mail: nothing happens unless the link is opened.";
  const text = `Hello,\n\n${lead}\n\nOpen this link to join:\n${p.link}\n\n${until}\n\n${ignore}\n`;
  const html = `<p>Hello,</p><p>${escapeHtml(lead)}</p><p><a href="${escapeHtml(p.link)}">Join ${escapeHtml(p.farmName)}</a></p><p>${escapeHtml(until)}</p><p>${escapeHtml(ignore)}</p>`;
  return { subject, text, html };
}

export async function inviteToFarm(who: Pick<Who, "farmId" | "userId">, invite: InvitationCreate, now = new Date()) {
  const input = { farmId: who.farmId, email: invite.email, role: invite.role, invitedBy: who.userId };
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
