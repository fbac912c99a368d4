import { claimAlertAs } from "@/lib/server/alerts/crew";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";

type Ctx = { params: Promise<{ alertId: string }> };

// POST /api/alerts/[alertId]/claim — "I'm on it": keepers and owners; 409 when someone was first
export const POST = route(async (_req, { params }: Ctx) => {
  const { alertId } = await params;
  const who = await requireMember({ alertId }, "log");
  return Response.json({ alert: await claimAlertAs(who, alertId) });
});
