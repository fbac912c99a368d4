import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { seriesQuery } from "@/lib/domain/validation/series";
import { readProbeSeries } from "@/lib/server/replica/chart-reads";

type Ctx = { params: Promise<{ probeId: string }> };

// GET /api/probes/[probeId]/series?metric=moisture&from=…&to=… — one metric of one probe for a chart
export const GET = route(async (req, { params }: Ctx) => {
  const { probeId } = await params;
  // A malformed id reads as an unknown one: 404 from authorize (farmOfTarget refuses non-integers).
  const id = /^\d{1,9}$/.test(probeId) ? Number(probeId) : Number.NaN;
  await requireMember({ probeId: id }, "read");
  const query = seriesQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await readProbeSeries(id, query));
});
