import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { idempotencyKey, loggedResponse } from "@/lib/web/idempotency-key";
import { listEntries } from "@/lib/server/logbook/list-entries";
import { logNote } from "@/lib/server/logbook/log-note";
import { logEntryListQuery, noteCreate } from "@/lib/domain/validation/log-entries";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/notes?limit= — newest first, with who
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = logEntryListQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await listEntries("notes", binId, q));
});

// POST /api/bins/[binId]/notes — keepers and owners log one;
// a repeated Idempotency-Key answers 200 with the entry stored the first time
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "log");
  const input = { ...noteCreate.parse(await readJson(req)), clientKey: idempotencyKey(req) };
  return loggedResponse(await logNote(who, binId, input));
});
