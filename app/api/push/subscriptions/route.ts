import { deletePushSubscription, isCrewAnywhere, savePushSubscription } from "@/db/queries/push";
import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { AppError, readJson } from "@/lib/web/errors";
import { pushSubscriptionBody, pushUnsubscribeBody } from "@/lib/domain/validation/alerts";

async function requireCrew() {
  const userId = await requireUser();
  if (!(await isCrewAnywhere(userId))) throw new AppError("forbidden", "Alerts go to keepers and owners; a viewer gets none.");
  return userId;
}

// POST /api/push/subscriptions — this phone gets alerts (keepers and owners)
export const POST = route(async (req) => {
  const userId = await requireCrew();
  const body = pushSubscriptionBody.parse(await readJson(req));
  const row = await savePushSubscription(userId, {
    endpoint: body.endpoint,
    p256dh: body.keys.p256dh,
    auth: body.keys.auth,
    userAgent: req.headers.get("user-agent"),
  });
  return Response.json({ subscription: { id: row.id } }, { status: 201 });
});

// DELETE /api/push/subscriptions — this phone stops getting alerts
export const DELETE = route(async (req) => {
  const userId = await requireCrew();
  const { endpoint } = pushUnsubscribeBody.parse(await readJson(req));
  return Response.json({ removed: await deletePushSubscription(userId, endpoint) });
});
