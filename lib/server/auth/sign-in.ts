// Checking an e-mail and password, with limits on guessing.
import createDebug from "debug";
import { z } from "zod";
import { forgetSignInTry, pruneSignInFailures, takeSignInTry } from "@/db/queries/sign-in-failures";
import { getUserByEmail, replacePasswordHash } from "@/db/queries/users";
import { checkPassword, strongerHash } from "./password";

const log = createDebug("wormward:sign-in");

// OWASP Authentication Cheat Sheet ("Account Lockout": a threshold, an observation window and a
// lockout duration) and NIST SP 800-63B §5.2.2 (at most 100 consecutive failures per account).
// 5 per account per 15 minutes leaves a person who mistypes room and a guesser 480 tries a day.
export const SIGN_IN_WINDOW_MS = 15 * 60_000;
export const FAILURES_PER_ACCOUNT = 5;
// An address may be a household, an office or a school behind one router: room for four people's
// full allowance, and still a wall against one machine walking a list of e-mails.
export const FAILURES_PER_ADDRESS = 20;

export const WRONG_PASSWORD = "That e-mail and password do not match an account.";

// Thrown, so next-auth passes the words to the form as `error`.
export class SignInRefused extends Error {}

export function tooManyTries(retryAt: Date, now: Date) {
  const minutes = Math.max(1, Math.ceil((retryAt.getTime() - now.getTime()) / 60_000));
  return `Too many tries. Try again in ${minutes} ${minutes === 1 ? "minute" : "minutes"}.`;
}

const credentials = z.object({ email: z.string().trim().toLowerCase().email().max(254), password: z.string().min(1).max(200) });

export type SignedInUser = { id: string; email: string; name: string; sessionVersion: number };

// null for a wrong e-mail or password, the same answer in the same time whether or not the account
// exists; SignInRefused while a limit holds, even for the right password.
export async function signInWithPassword(raw: unknown, address: string | null, now = new Date()): Promise<SignedInUser | null> {
  const parsed = credentials.safeParse(raw);
  if (!parsed.success) return null;
  const { email, password } = parsed.data;
  const accountKey = `account:${email}`;
  const limits = [{ key: accountKey, max: FAILURES_PER_ACCOUNT }];
  if (address) limits.push({ key: `address:${address}`, max: FAILURES_PER_ADDRESS });
  const taken = await takeSignInTry(limits, SIGN_IN_WINDOW_MS, now);
  if (!taken.ok) {
    log("sign-in refused: limit reached for %s", address ? "the account or the address" : "the account");
    throw new SignInRefused(tooManyTries(taken.retryAt, now));
  }
  const user = await getUserByEmail(email);
  const matches = await checkPassword(password, user?.passwordHash ?? null);
  if (matches && user) {
    await forgetSignInTry(taken.ids, accountKey);
    const upgraded = await strongerHash(password, user.passwordHash);
    if (upgraded) await replacePasswordHash(user.id, user.passwordHash, upgraded);
    return { id: user.id, email: user.email, name: user.name, sessionVersion: user.sessionVersion };
  }
  await pruneSignInFailures(new Date(now.getTime() - SIGN_IN_WINDOW_MS));
  return null;
}
