import { readAlert } from "@/lib/alerts/crew";
import { route } from "@/lib/api/route";
import { requireMember } from "@/lib/auth/session";

type Ctx = { params: Promise<{ alertId: string }> };

// GET /api/alerts/[alertId] — one alert with its events (who, when, what was sent where)
export const GET = route(async (_req, { params }: Ctx) => {
  const { alertId } = await params;
  const who = await requireMember({ alertId }, "read");
  return Response.json({ alert: await readAlert(who, alertId) });
});
