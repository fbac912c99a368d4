import { z } from "zod";
import { listNotes, insertNote } from "@/db/queries/logbook";
import { route } from "@/lib/api/route";
import { requireMember } from "@/lib/auth/session";
import { readJson } from "@/lib/errors";
import { noteCreate } from "@/lib/validation/log-entries";

type Ctx = { params: Promise<{ binId: string }> };
const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(50) });

// GET /api/bins/[binId]/notes — newest first
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = listQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json({ notes: await listNotes(binId, q) });
});

// POST /api/bins/[binId]/notes — log one
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "log");
  const { zoneId, at, notes, ...rest } = noteCreate.parse(await readJson(req));
  const entry = await insertNote({ ...rest, farmId: who.farmId, binId, zoneId: zoneId ?? null, at: at ?? new Date(), byUserId: who.userId, notes: notes ?? null });
  return Response.json({ note: entry }, { status: 201 });
});
