import { getUser, listMyFarms } from "@/db/queries/users";
import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { AppError, readJson } from "@/lib/web/errors";
import { updateMe } from "@/lib/server/people/update-me";
import { meUpdate } from "@/lib/domain/validation/alerts";

// GET /api/me — who is signed in, their quiet hours and the farms they belong to
export const GET = route(async () => {
  const userId = await requireUser();
  const user = await getUser(userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  return Response.json({
    id: user.id,
    name: user.name,
    email: user.email,
    quietFrom: user.quietFrom,
    quietTo: user.quietTo,
    timezone: user.timezone,
    farms: await listMyFarms(userId),
  });
});

// PATCH /api/me — a person's own quiet hours (they hold back heads-ups only) and timezone
export const PATCH = route(async (req) => {
  const userId = await requireUser();
  const patch = meUpdate.parse(await readJson(req));
  return Response.json(await updateMe(userId, patch));
});
