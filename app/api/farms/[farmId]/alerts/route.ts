import { listAlerts } from "@/db/queries/alerts";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { alertListQuery } from "@/lib/domain/validation/alerts";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/alerts?state=open|all — a farm's alerts, newest first
export const GET = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const q = alertListQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json({ alerts: await listAlerts(who.farmId, { open: q.state === "open" }) });
});
