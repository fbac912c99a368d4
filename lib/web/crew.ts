// Who may touch push subscriptions: a signed-in keeper or owner of some farm (not one farm's member,
// so requireMember does not fit).
import { authorizeCrew } from "@/lib/server/push/crew";
import { currentUserId } from "./session";

export async function requireCrew() {
  return authorizeCrew(await currentUserId());
}
