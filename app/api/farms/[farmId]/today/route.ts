import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readToday } from "@/lib/server/farms/read-today";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/today — every bin and zone with latest values, 24 h sparklines, open alerts
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json(await readToday(who));
});
