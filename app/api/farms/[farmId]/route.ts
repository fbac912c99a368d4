import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { readFarm } from "@/lib/server/farms/read-farm";
import { updateFarmSettings } from "@/lib/server/farms/update-farm";
import { farmUpdate } from "@/lib/domain/validation/farm";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId] — the farm and the caller's role on it
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json(await readFarm(who));
});

// PATCH /api/farms/[farmId] — owners rename the farm or change its units and timezone
export const PATCH = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const patch = farmUpdate.parse(await readJson(req));
  return Response.json({ farm: await updateFarmSettings(who, patch) });
});
