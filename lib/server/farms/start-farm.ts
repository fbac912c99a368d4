import { createFarm } from "@/db/queries/farms";
import { getUser } from "@/db/queries/users";
import { AppError } from "@/lib/domain/errors";
import type { FarmCreate } from "@/lib/domain/validation/farm";

/** Anyone signed in with a confirmed address may start a farm of their own; they become its owner. */
export async function startFarm(userId: string, input: FarmCreate) {
  const user = await getUser(userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  if (!user.emailVerifiedAt) throw new AppError("forbidden", "Confirm your e-mail address first: open the link we sent you.");
  return createFarm(userId, input);
}
