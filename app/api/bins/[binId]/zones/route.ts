import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { addBinZone } from "@/lib/server/zones/add-zone";
import { listBinZones } from "@/lib/server/zones/list-zones";
import { zoneCreate } from "@/lib/domain/validation/farm";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/zones — a bin's zones from the feeding side to the harvest side
export const GET = route(async (_req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  return Response.json(await listBinZones(binId));
});

// POST /api/bins/[binId]/zones — owners add a zone at the harvest end
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "manage");
  const input = zoneCreate.parse(await readJson(req));
  return Response.json(await addBinZone(binId, input), { status: 201 });
});
