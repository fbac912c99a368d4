import { createFarm } from "@/db/queries/farms";
import { listMyFarms } from "@/db/queries/users";
import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { farmCreate } from "@/lib/domain/validation/farm";

// GET /api/farms — the signed-in person's farms with their role on each
export const GET = route(async () => {
  const userId = await requireUser();
  return Response.json({ farms: await listMyFarms(userId) });
});

// POST /api/farms — anyone signed in may start a farm of their own and becomes its owner
export const POST = route(async (req) => {
  const userId = await requireUser();
  const input = farmCreate.parse(await readJson(req));
  return Response.json({ farm: await createFarm(userId, input) }, { status: 201 });
});
