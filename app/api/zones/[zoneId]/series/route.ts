import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { seriesQuery } from "@/lib/domain/validation/series";
import { readZoneSeries } from "@/lib/server/replica/chart-reads";

type Ctx = { params: Promise<{ zoneId: string }> };

// GET /api/zones/[zoneId]/series?metric=temperature&from=…&to=… — one metric of the zone's probes for a chart
export const GET = route(async (req, { params }: Ctx) => {
  const { zoneId } = await params;
  await requireMember({ zoneId }, "read");
  const query = seriesQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await readZoneSeries(zoneId, query));
});
