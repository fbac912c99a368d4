import { getUser, listMyFarms } from "@/db/queries/users";
import { route } from "@/lib/api/route";
import { requireUser } from "@/lib/auth/session";
import { AppError } from "@/lib/errors";

// GET /api/me — who is signed in and the farms they belong to
export const GET = route(async () => {
  const userId = await requireUser();
  const user = await getUser(userId);
  if (!user) throw new AppError("unauthenticated", "Sign in first.");
  return Response.json({ id: user.id, name: user.name, email: user.email, farms: await listMyFarms(userId) });
});
