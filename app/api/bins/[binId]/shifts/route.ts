import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { listBinShifts } from "@/lib/server/logbook/list-shifts";
import { logShift } from "@/lib/server/logbook/log-shift";
import { logEntryListQuery, shiftCreateFor } from "@/lib/domain/validation/log-entries";
import { idempotencyKey } from "@/lib/web/idempotency-key";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/shifts?limit= — newest first, with who
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = logEntryListQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await listBinShifts(binId, q));
});

// POST /api/bins/[binId]/shifts — keepers and owners log material moved between two zones of the
// bin; an Idempotency-Key makes a resend answer 200 with the stored shift instead of a second one.
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "log");
  const input = shiftCreateFor(who.units).parse(await readJson(req));
  const { created, shift } = await logShift(who, binId, input, idempotencyKey(req));
  return Response.json({ shift }, { status: created ? 201 : 200 });
});
