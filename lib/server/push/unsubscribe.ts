import { deletePushSubscription } from "@/db/queries/push";
import type { Who } from "@/lib/server/auth/authorize";

/** This phone stops getting alerts; another person's subscription to the same endpoint stays. */
export async function unsubscribePush(who: Pick<Who, "userId">, endpoint: string) {
  return deletePushSubscription(who.userId, endpoint);
}
