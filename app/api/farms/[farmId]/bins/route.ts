import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { addBin } from "@/lib/server/bins/add-bin";
import { listFarmBins } from "@/lib/server/bins/list-bins";
import { binCreateFor, binListQuery } from "@/lib/domain/validation/farm";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/bins — bins with their zones; ?archived=1 includes archived bins
export const GET = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const q = binListQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await listFarmBins(who, q));
});

// POST /api/farms/[farmId]/bins — owners add a bin; its zones are made from zoneCount
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const input = binCreateFor(who.units).parse(await readJson(req));
  return Response.json(await addBin(who, input), { status: 201 });
});
