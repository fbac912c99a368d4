import { archiveBin, getBin, updateBin } from "@/db/queries/bins";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { binUpdate } from "@/lib/domain/validation/farm";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId] — one bin with its zones
export const GET = route(async (_req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  return Response.json({ bin: await getBin(binId) });
});

// PATCH /api/bins/[binId] — owners edit a bin; {"archived": false} brings an archived bin back
export const PATCH = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "manage");
  const body = (await readJson(req)) as Record<string, unknown> | null;
  const restore = body && typeof body === "object" && body.archived === false;
  const patch = binUpdate.parse(restore ? { ...body, archived: undefined } : body);
  return Response.json({ bin: await updateBin(binId, { ...patch, ...(restore ? { archivedAt: null } : {}) }) });
});

// DELETE /api/bins/[binId] — owners archive a bin (its readings and logbook stay)
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "manage");
  return Response.json({ bin: await archiveBin(binId) });
});
