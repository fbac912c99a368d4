import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { listFarmsOf } from "@/lib/server/farms/list-farms";
import { startFarm } from "@/lib/server/farms/start-farm";
import { farmCreate } from "@/lib/domain/validation/farm";

// GET /api/farms — the signed-in person's farms with their role on each
export const GET = route(async () => {
  const userId = await requireUser();
  return Response.json({ farms: await listFarmsOf(userId) });
});

// POST /api/farms — anyone signed in may start a farm of their own and becomes its owner
export const POST = route(async (req) => {
  const userId = await requireUser();
  const input = farmCreate.parse(await readJson(req));
  return Response.json({ farm: await startFarm(userId, input) }, { status: 201 });
});
