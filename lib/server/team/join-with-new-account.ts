import { getFarm } from "@/db/queries/farms";
import { hashPassword } from "@/lib/server/auth/password";
import type { JoinNew } from "@/lib/domain/validation/team";
import { AppError } from "@/lib/domain/errors";
import { EMAIL_HAS_ACCOUNT, openInvitation, takeInvitation } from "./invitation-link";

/** A person without an account joins by the link alone: the invited address becomes their sign-in. */
export async function joinWithNewAccount(token: string, input: Pick<JoinNew, "name" | "password">, now = new Date()) {
  const inv = await openInvitation(token, now);
  if (inv.hasAccount) throw new AppError("conflict", EMAIL_HAS_ACCOUNT);
  const farm = await getFarm(inv.farmId);
  const passwordHash = await hashPassword(input.password);
  const joined = await takeInvitation(token, { newUser: { email: inv.email, name: input.name, passwordHash, timezone: farm?.timezone ?? "UTC" } }, now);
  return { ...joined, email: inv.email };
}
