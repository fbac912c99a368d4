import { route } from "@/lib/web/api/route";
import { requireCrew } from "@/lib/web/crew";
import { readJson } from "@/lib/web/errors";
import { subscribePush } from "@/lib/server/push/subscribe";
import { unsubscribePush } from "@/lib/server/push/unsubscribe";
import { pushSubscriptionBody, pushUnsubscribeBody } from "@/lib/domain/validation/alerts";

// POST /api/push/subscriptions — this phone gets alerts (keepers and owners)
export const POST = route(async (req) => {
  const who = await requireCrew();
  const sub = pushSubscriptionBody.parse(await readJson(req));
  return Response.json({ subscription: await subscribePush(who, sub, req.headers.get("user-agent")) }, { status: 201 });
});

// DELETE /api/push/subscriptions — this phone stops getting alerts
export const DELETE = route(async (req) => {
  const who = await requireCrew();
  const { endpoint } = pushUnsubscribeBody.parse(await readJson(req));
  return Response.json({ removed: await unsubscribePush(who, endpoint) });
});
