import { route } from "@/lib/api/route";
import { requireUser } from "@/lib/auth/session";
import { env } from "@/lib/env";
import { AppError } from "@/lib/errors";

// GET /api/push/key — the VAPID public key a browser subscribes with (RFC 8292 applicationServerKey)
export const GET = route(async () => {
  await requireUser();
  const key = env().VAPID_PUBLIC_KEY;
  if (!key) throw new AppError("not_found", "Push is not set up on this server.");
  return Response.json({ publicKey: key });
});
