import bcrypt from "bcryptjs";
import { AppError } from "@/lib/domain/errors";
import { PASSWORD_MAX_BYTES, PASSWORD_TOO_LONG, passwordBytes } from "../../domain/password-rules";

// OWASP Password Storage Cheat Sheet: bcrypt with a work factor of at least 10; 12 costs about
// 350 ms here, slow enough for a guesser and still quick for a person signing in.
export const BCRYPT_COST = 12;

export async function hashPassword(plain: string) {
  // The last guard behind the forms' own check, so no door can store a silently cut password.
  if (passwordBytes(plain) > PASSWORD_MAX_BYTES) throw new AppError("invalid", PASSWORD_TOO_LONG, "password");
  return bcrypt.hash(plain, BCRYPT_COST);
}

// Hashes stored at a lower cost (10, before this one) are redone at sign-in, the one moment the
// password is known (OWASP Password Storage Cheat Sheet, "Upgrading the work factor"); until then
// a wrong password for such an account answers faster than the dummy compare. Null: no need.
export async function strongerHash(plain: string, hash: string): Promise<string | null> {
  return bcrypt.getRounds(hash) < BCRYPT_COST ? bcrypt.hash(plain, BCRYPT_COST) : null;
}

// A hash of a random password nobody kept, at the same cost: an unknown e-mail is compared against
// it so the answer takes as long as for a real account (OWASP Authentication Cheat Sheet,
// "Authentication Responses"). Its result never counts.
export const DUMMY_HASH = "$2b$12$awcPd5E2amYVsxzC6F4Ufen2hFT2JQPFh3Q2F1mvHKkGxPSD4Lnya";

export async function checkPassword(plain: string, hash: string | null): Promise<boolean> {
  const ok = await bcrypt.compare(plain, hash ?? DUMMY_HASH);
  return hash !== null && ok;
}
