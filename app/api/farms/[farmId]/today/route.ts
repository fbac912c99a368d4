import { getToday } from "@/db/queries/today";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/today — every bin and zone with latest values, 24 h sparklines, open alerts
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json(await getToday(who.farmId));
});
