import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { seriesQuery } from "@/lib/domain/validation/series";
import { readBinSeries } from "@/lib/server/replica/chart-reads";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/series?metric=temperature&from=…&to=… — one metric of every zone of the bin for a chart
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const query = seriesQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await readBinSeries(binId, query));
});
