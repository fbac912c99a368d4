import { savePushSubscription } from "@/db/queries/push";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import type { PushSubscriptionBody } from "@/lib/domain/validation/alerts";
import { configuredAllowList, endpointProblem } from "./push-policy";

/**
 * This phone gets alerts. Only a browser push service's https endpoint is kept: a subscription must
 * not become a way for us to POST into our own network (OWASP Server-Side Request Forgery
 * Prevention Cheat Sheet). A refusal names the field as a schema's would.
 */
export async function subscribePush(who: Pick<Who, "userId">, sub: PushSubscriptionBody, userAgent: string | null) {
  const problem = endpointProblem(sub.endpoint, configuredAllowList());
  if (problem) throw new AppError("invalid", `endpoint: ${problem}`, "endpoint");
  const row = await savePushSubscription(who.userId, { endpoint: sub.endpoint, p256dh: sub.keys.p256dh, auth: sub.keys.auth, userAgent });
  return { id: row.id };
}
