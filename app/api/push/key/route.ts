import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { env } from "@/lib/server/env";
import { AppError } from "@/lib/domain/errors";

// GET /api/push/key — the VAPID public key a browser subscribes with (RFC 8292 applicationServerKey)
export const GET = route(async () => {
  await requireUser();
  const key = env().VAPID_PUBLIC_KEY;
  if (!key) throw new AppError("not_found", "Push is not set up on this server.");
  return Response.json({ publicKey: key });
});
