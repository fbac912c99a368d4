import { isCrewAnywhere } from "@/db/queries/push";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";

/** Alerts, and so the phones they go to, are for keepers and owners: a person who is only a viewer
 * everywhere has none. */
export async function authorizeCrew(userId: string | null): Promise<Pick<Who, "userId">> {
  if (!userId) throw new AppError("unauthenticated", "Sign in first.");
  if (!(await isCrewAnywhere(userId))) throw new AppError("forbidden", "Alerts go to keepers and owners; a viewer gets none.");
  return { userId };
}
