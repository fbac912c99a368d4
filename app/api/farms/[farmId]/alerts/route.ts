import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { listFarmAlerts } from "@/lib/server/alerts/list-alerts";
import { alertListQuery } from "@/lib/domain/validation/alerts";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/alerts?state=open|all — a farm's alerts, newest first
export const GET = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const query = alertListQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json({ alerts: await listFarmAlerts(who, query) });
});
