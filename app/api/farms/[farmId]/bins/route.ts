import { createBin, listBins } from "@/db/queries/bins";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { binCreate, defaultZoneKinds } from "@/lib/domain/validation/farm";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/bins — bins with their zones; ?archived=1 includes archived bins
export const GET = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const includeArchived = new URL(req.url).searchParams.get("archived") === "1";
  return Response.json({ bins: await listBins(who.farmId, { includeArchived }) });
});

// POST /api/farms/[farmId]/bins — owners add a bin; its zones are made from zoneCount
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const { zoneCount, ...bin } = binCreate.parse(await readJson(req));
  return Response.json({ bin: await createBin(who.farmId, { ...bin, zoneKinds: defaultZoneKinds(zoneCount) }) }, { status: 201 });
});
