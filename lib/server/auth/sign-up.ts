// Making an account from the sign-in page: a one-time link by mail confirms the address before the
// account can do anything. The answer on screen is the same whether or not the address already has
// an account; only the mail differs ("confirm" for a new one, "you already have an account" else).
import createDebug from "debug";
import { consumeEmailVerification, createEmailVerification, getEmailVerification, insertUnverifiedUser } from "@/db/queries/email-verifications";
import { getUser, getUserByEmail } from "@/db/queries/users";
import { appMailer, escapeHtml } from "@/lib/server/mail/app-mailer";
import { hashPassword } from "@/lib/server/auth/password";
import { hashToken, newLinkToken } from "@/lib/server/auth/tokens";
import { env } from "@/lib/server/env";
import { AppError } from "@/lib/domain/errors";
import type { SignUpInput } from "@/lib/domain/validation/sign-up";

const log = createDebug("wormward:sign-up");
export const VERIFY_HOURS = 24;
// Sign-up, resend and "already registered" mails together; the same limit as reset links.
export const SIGN_UP_MAILS_PER_HOUR = 3;
export const SIGN_UP_ANSWER = `Check your mail. If this address is new to Wormward, we sent it a link to confirm it; the link works once, for ${VERIFY_HOURS} hours. If the address already has an account, we sent it a note saying so.`;

type Mail = { subject: string; text: string; html: string };

export function verifyMail(p: { name: string; link: string }): Mail {
  const lead = "Welcome to Wormward. Confirm this address to finish making your account.";
  const valid = `The link works once, for ${VERIFY_HOURS} hours.`;
  const ignore = "If you did not sign up, ignore this mail: no account is opened without the link.";
  return {
    subject: "[Wormward] Confirm your e-mail address",
    text: `Hello ${p.name},\n\n${lead}\n\nConfirm here:\n${p.link}\n\n${valid}\n\n${ignore}\n`,
    html: `<p>Hello ${escapeHtml(p.name)},</p><p>${escapeHtml(lead)}</p><p><a href="${escapeHtml(p.link)}">Confirm my address</a></p><p>${escapeHtml(valid)}</p><p>${escapeHtml(ignore)}</p>`,
  };
}

export function alreadyRegisteredMail(p: { name: string; signIn: string; forgot: string }): Mail {
  const lead = "Someone (we hope you) tried to make a new Wormward account with this address, which already has one.";
  const next = "Sign in with your password, or set a new one if you forgot it.";
  const ignore = "If it was not you, ignore this mail: nothing has changed.";
  return {
    subject: "[Wormward] You already have an account",
    text: `Hello ${p.name},\n\n${lead}\n\n${next}\nSign in: ${p.signIn}\nForgot your password: ${p.forgot}\n\n${ignore}\n`,
    html: `<p>Hello ${escapeHtml(p.name)},</p><p>${escapeHtml(lead)}</p><p>${escapeHtml(next)}</p><p><a href="${escapeHtml(p.signIn)}">Sign in</a> · <a href="${escapeHtml(p.forgot)}">Forgot your password</a></p><p>${escapeHtml(ignore)}</p>`,
  };
}

function send(to: string, mail: Mail, what: string, userId: string) {
  const mailer = appMailer();
  if (!mailer) {
    log("%s for user %s not mailed: SMTP is not set up", what, userId);
    return;
  }
  // Not awaited: the answer takes as long whether or not the address had an account.
  void mailer
    .send({ to, ...mail })
    .then(() => log("%s sent for user %s", what, userId))
    .catch((e: Error) => log("%s for user %s failed: %s", what, userId, e.message));
}

async function mailLink(user: { id: string; email: string; name: string }, now: Date) {
  const token = newLinkToken();
  const stored = await createEmailVerification(
    { userId: user.id, kind: "verify", tokenHash: hashToken(token), expiresAt: new Date(now.getTime() + VERIFY_HOURS * 3_600_000), createdAt: now },
    { max: SIGN_UP_MAILS_PER_HOUR, since: new Date(now.getTime() - 3_600_000) },
  );
  if (!stored) return log("verification mail for user %s held back: %d in the last hour", user.id, SIGN_UP_MAILS_PER_HOUR);
  send(user.email, verifyMail({ name: user.name, link: `${env().APP_URL}/verify/${token}` }), "verification mail", user.id);
}

export async function signUp(input: SignUpInput, now = new Date()): Promise<string> {
  // Hashed before the lookup, so a known address answers in the same time as a new one.
  const passwordHash = await hashPassword(input.password);
  const made = await insertUnverifiedUser({ email: input.email, name: input.name, passwordHash });
  if (made) {
    log("account %s made, waiting for its address", made.id);
    await mailLink(made, now);
    return SIGN_UP_ANSWER;
  }
  const known = await getUserByEmail(input.email);
  if (!known) return SIGN_UP_ANSWER;
  // Still unconfirmed: the person may have lost the first mail; a new link helps them more.
  if (!known.emailVerifiedAt) {
    await mailLink(known, now);
    return SIGN_UP_ANSWER;
  }
  const stored = await createEmailVerification(
    { userId: known.id, kind: "notice", tokenHash: hashToken(newLinkToken()), expiresAt: now, createdAt: now },
    { max: SIGN_UP_MAILS_PER_HOUR, since: new Date(now.getTime() - 3_600_000) },
  );
  if (stored) {
    const base = env().APP_URL;
    send(known.email, alreadyRegisteredMail({ name: known.name, signIn: `${base}/sign-in`, forgot: `${base}/forgot` }), "already-registered mail", known.id);
  }
  return SIGN_UP_ANSWER;
}

export const RESEND_ANSWER = `If you have not confirmed yet, a new link is on its way (at most ${SIGN_UP_MAILS_PER_HOUR} mails an hour).`;

/** "Send the link again" on the check-your-mail screen, for the signed-in person. */
export async function resendVerification(userId: string, now = new Date()): Promise<string> {
  const user = await getUser(userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  if (user.emailVerifiedAt) return "Your address is already confirmed.";
  await mailLink(user, now);
  return RESEND_ANSWER;
}

export async function isVerified(userId: string): Promise<boolean> {
  const user = await getUser(userId);
  return Boolean(user?.emailVerifiedAt);
}

export async function emailOf(userId: string): Promise<string | null> {
  return (await getUser(userId))?.email ?? null;
}

export type VerifyLookup = { state: "open"; email: string } | { state: "unknown" | "used" | "expired" };

export async function lookupVerification(token: string, now = new Date()): Promise<VerifyLookup> {
  const r = await getEmailVerification(hashToken(token));
  if (!r) return { state: "unknown" };
  if (r.link.usedAt) return { state: "used" };
  if (r.link.expiresAt <= now) return { state: "expired" };
  return { state: "open", email: r.email };
}

export const VERIFY_REFUSALS = {
  unknown: "This link is not valid. Check that the whole link was copied, or sign in and ask for a new one.",
  used: "This link has already been used. If your address is confirmed, just sign in.",
  expired: `This link has expired (links last ${VERIFY_HOURS} hours). Sign in and ask for a new one.`,
} as const;

export async function verifyEmail(token: string, now = new Date()) {
  const done = await consumeEmailVerification(hashToken(token), now);
  if (done) {
    log("address confirmed for user %s", done.userId);
    return done;
  }
  const found = await lookupVerification(token, now);
  const state = found.state === "open" ? "used" : found.state;
  throw new AppError(state === "unknown" ? "not_found" : "conflict", VERIFY_REFUSALS[state]);
}
