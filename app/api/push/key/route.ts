import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { pushPublicKey } from "@/lib/server/push/public-key";

// GET /api/push/key — the VAPID public key a browser subscribes with (RFC 8292 applicationServerKey)
export const GET = route(async () => {
  await requireUser();
  return Response.json(pushPublicKey());
});
