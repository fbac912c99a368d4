// "My data": everything of mine and of the farms I own, as JSON; and deleting my account.
import { collectMyData } from "@/db/queries/my-data";
import { deleteUserRows } from "@/db/queries/farm-removal";
import { AppError } from "@/lib/domain/errors";
import { DELETE_ACCOUNT_WORDS } from "@/lib/domain/validation/sign-up";

export async function exportMyData(userId: string, now = new Date()) {
  const data = await collectMyData(userId);
  if (!data) throw new AppError("unauthenticated", "Sign in first.");
  return { exportedAt: now.toISOString(), about: "Everything Wormward holds about you and the farms you own.", ...data };
}

/** Refused while the person is the last owner of a farm others are on (they would be left with no
 * one to run it); otherwise the farms they alone are on go with them. */
export async function deleteMyAccount(userId: string, confirm: string) {
  if (confirm.trim().toLowerCase() !== DELETE_ACCOUNT_WORDS) {
    throw new AppError("invalid", `Type "${DELETE_ACCOUNT_WORDS}" to delete your account.`, "confirm");
  }
  const result = await deleteUserRows(userId);
  if ("refused" in result) {
    const names = result.refused.join(", ");
    throw new AppError(
      "conflict",
      `You are the last owner of ${names}, where others are members. Make one of them an owner (on the Team page) or delete the farm first; nothing was deleted.`,
    );
  }
  return result;
}
