import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { idempotencyKey, loggedResponse } from "@/lib/web/idempotency-key";
import { listBinFeedings } from "@/lib/server/logbook/list-feedings";
import { logFeeding } from "@/lib/server/logbook/log-feeding";
import { feedingCreateFor, feedingListQuery } from "@/lib/domain/validation/logbook";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/feedings?since=&limit= — a bin's feedings, newest first
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = feedingListQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await listBinFeedings(binId, q));
});

// POST /api/bins/[binId]/feedings — log a feeding; the mix check is computed and kept with it;
// a repeated Idempotency-Key answers 200 with the entry stored the first time
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "log");
  const input = { ...feedingCreateFor(who.units).parse(await readJson(req)), clientKey: idempotencyKey(req) };
  return loggedResponse(await logFeeding(who, binId, input));
});
