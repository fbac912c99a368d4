// "Forgot your password?": a one-hour, single-use link by mail. The answer never says whether an
// account exists, and an address gets at most 3 links an hour.
import createDebug from "debug";
import { consumePasswordReset, createPasswordReset, getPasswordReset } from "@/db/queries/password-resets";
import { getUserByEmail } from "@/db/queries/users";
import { appMailer, escapeHtml } from "@/lib/server/mail/app-mailer";
import { hashPassword } from "@/lib/server/auth/password";
import { hashToken, newLinkToken } from "@/lib/server/auth/tokens";
import { env } from "@/lib/server/env";
import { AppError } from "@/lib/domain/errors";

const log = createDebug("wormward:reset");
export const RESET_MINUTES = 60;
export const RESETS_PER_HOUR = 3;
export const RESET_ANSWER = `If an account exists for that e-mail, we sent it a link to set a new password. The link works once, for ${RESET_MINUTES} minutes.`;

export function resetMail(p: { name: string; link: string }) {
  const lead = `Someone (we hope you) asked to set a new Wormward password for this address.`;
  const valid = `The link works once, for ${RESET_MINUTES} minutes.`;
  const ignore = "If it was not you, ignore this mail: your password stays as it is.";
  return {
    subject: "[Wormward] Set a new password",
    text: `Hello ${p.name},\n\n${lead}\n\nSet a new password here:\n${p.link}\n\n${valid}\n\n${ignore}\n`,
    html: `<p>Hello ${escapeHtml(p.name)},</p><p>${escapeHtml(lead)}</p><p><a href="${escapeHtml(p.link)}">Set a new password</a></p><p>${escapeHtml(valid)}</p><p>${escapeHtml(ignore)}</p>`,
  };
}

export async function requestPasswordReset(email: string, now = new Date()): Promise<void> {
  const user = await getUserByEmail(email);
  if (!user) {
    log("reset asked for an address with no account");
    return;
  }
  const token = newLinkToken();
  const stored = await createPasswordReset(
    { userId: user.id, tokenHash: hashToken(token), expiresAt: new Date(now.getTime() + RESET_MINUTES * 60_000), createdAt: now },
    { max: RESETS_PER_HOUR, since: new Date(now.getTime() - 3_600_000) },
  );
  if (!stored) {
    log("reset mail for user %s held back: %d in the last hour", user.id, RESETS_PER_HOUR);
    return;
  }
  const mailer = appMailer();
  if (!mailer) {
    log("reset for user %s not mailed: SMTP is not set up", user.id);
    return;
  }
  // Not awaited: the answer then takes as long whether or not the account exists.
  void mailer
    .send({ to: user.email, ...resetMail({ name: user.name, link: `${env().APP_URL}/reset/${token}` }) })
    .then(() => log("reset mail sent for user %s", user.id))
    .catch((e: Error) => log("reset mail for user %s failed: %s", user.id, e.message));
}

export type ResetLookup = { state: "open"; email: string } | { state: "unknown" | "used" | "expired" };

export async function lookupReset(token: string, now = new Date()): Promise<ResetLookup> {
  const r = await getPasswordReset(hashToken(token));
  if (!r) return { state: "unknown" };
  if (r.reset.usedAt) return { state: "used" };
  if (r.reset.expiresAt <= now) return { state: "expired" };
  return { state: "open", email: r.email };
}

export const RESET_REFUSALS = {
  unknown: "This link is not valid. Check that the whole link was copied, or ask for a new one.",
  used: "This link has already been used. If you still cannot sign in, ask for a new one.",
  expired: `This link has expired (links last ${RESET_MINUTES} minutes). Ask for a new one.`,
} as const;

export async function resetPassword(token: string, password: string, now = new Date()) {
  const passwordHash = await hashPassword(password);
  const done = await consumePasswordReset(hashToken(token), passwordHash, now);
  if (done) {
    log("password reset for user %s", done.userId);
    return done;
  }
  const found = await lookupReset(token, now);
  const state = found.state === "open" ? "used" : found.state;
  throw new AppError(state === "unknown" ? "not_found" : "conflict", RESET_REFUSALS[state]);
}
