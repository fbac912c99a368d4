import { releaseAlertAs } from "@/lib/server/alerts/crew";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";

type Ctx = { params: Promise<{ alertId: string }> };

// POST /api/alerts/[alertId]/release — hand a claim back: the alert is raised again, for anyone to claim
export const POST = route(async (_req, { params }: Ctx) => {
  const { alertId } = await params;
  const who = await requireMember({ alertId }, "log");
  return Response.json({ alert: await releaseAlertAs(who, alertId) });
});
