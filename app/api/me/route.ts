import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { readMe } from "@/lib/server/people/read-me";
import { updateMe } from "@/lib/server/people/update-me";
import { meUpdate } from "@/lib/domain/validation/alerts";

// GET /api/me — who is signed in, their quiet hours and the farms they belong to
export const GET = route(async () => {
  const userId = await requireUser();
  return Response.json(await readMe(userId));
});

// PATCH /api/me — a person's own quiet hours (they hold back heads-ups only) and timezone
export const PATCH = route(async (req) => {
  const userId = await requireUser();
  const patch = meUpdate.parse(await readJson(req));
  return Response.json(await updateMe(userId, patch));
});
