import { getToday } from "@/db/queries/today";
import type { Who } from "@/lib/server/auth/authorize";

/** Today: every bin and zone of the farm with latest values and 24 h sparklines, and the open alerts. */
export async function readToday(who: Pick<Who, "farmId">) {
  return getToday(who.farmId);
}
