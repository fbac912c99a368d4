import { readAlert } from "@/lib/server/alerts/crew";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";

type Ctx = { params: Promise<{ alertId: string }> };

// GET /api/alerts/[alertId] — one alert with its events (who, when, what was sent where)
export const GET = route(async (_req, { params }: Ctx) => {
  const { alertId } = await params;
  const who = await requireMember({ alertId }, "read");
  return Response.json({ alert: await readAlert(who, alertId) });
});
