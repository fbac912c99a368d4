import { sendTestPush } from "@/lib/server/alerts/deliver";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";

/** A test notification to every phone of the caller; each result carries the status and a reason in
 * our words, never what the push service answered. */
export async function testPush(who: Pick<Who, "userId">) {
  const results = await sendTestPush(who.userId);
  if (results.length === 0) throw new AppError("not_found", "No phone of yours is set up for alerts yet.");
  return { sent: results.filter((r) => r.ok).length, results };
}
