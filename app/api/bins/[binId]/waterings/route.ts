import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { idempotencyKey, loggedResponse } from "@/lib/web/idempotency-key";
import { listEntries } from "@/lib/server/logbook/list-entries";
import { logWatering } from "@/lib/server/logbook/log-watering";
import { logEntryListQuery, wateringCreateFor } from "@/lib/domain/validation/log-entries";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/waterings?limit= — newest first, with who
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = logEntryListQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await listEntries("waterings", binId, q));
});

// POST /api/bins/[binId]/waterings — keepers and owners log one;
// a repeated Idempotency-Key answers 200 with the entry stored the first time
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "log");
  const input = { ...wateringCreateFor(who.units).parse(await readJson(req)), clientKey: idempotencyKey(req) };
  return loggedResponse(await logWatering(who, binId, input));
});
