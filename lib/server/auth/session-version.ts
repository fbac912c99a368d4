import type { JWT } from "next-auth/jwt";
import { getSessionVersion } from "@/db/queries/users";

// A token is good while its person exists and its session version is the person's current one; a
// password reset raises the version and so ends every session signed in before it (OWASP Session
// Management Cheat Sheet, "Renew the Session ID After Any Privilege Level Change": a credential
// change invalidates existing sessions). Tokens from before versions existed carry none: 0.
export async function tokenIsCurrent(token: JWT | null): Promise<boolean> {
  if (!token || typeof token.uid !== "string") return false;
  const current = await getSessionVersion(token.uid);
  return current !== null && current === (typeof token.sv === "number" ? token.sv : 0);
}
