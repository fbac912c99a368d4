import { getProbeSeries } from "@/db/queries/series";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { AppError } from "@/lib/domain/errors";
import { seriesQuery } from "@/lib/domain/validation/series";

type Ctx = { params: Promise<{ probeId: string }> };

// GET /api/probes/[probeId]/series?metric=moisture&from=…&to=… — one metric of one probe for a chart
export const GET = route(async (req, { params }: Ctx) => {
  const { probeId } = await params;
  // A malformed id reads as an unknown one: 404 from authorize (farmOfTarget refuses non-integers).
  const id = /^\d{1,9}$/.test(probeId) ? Number(probeId) : Number.NaN;
  await requireMember({ probeId: id }, "read");
  const query = seriesQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  const series = await getProbeSeries(id, query);
  if (!series) throw new AppError("not_found", "Not found.");
  return Response.json(series);
});
