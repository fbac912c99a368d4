import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { archiveBinAs } from "@/lib/server/bins/archive-bin";
import { editBin } from "@/lib/server/bins/edit-bin";
import { readBin } from "@/lib/server/bins/read-bin";
import { binPatchFor } from "@/lib/domain/validation/farm";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId] — one bin with its zones
export const GET = route(async (_req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  return Response.json(await readBin(binId));
});

// PATCH /api/bins/[binId] — owners edit a bin, keepers its feeding interval and planned harvest;
// {"archived": false} brings an archived bin back
export const PATCH = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "log");
  const input = binPatchFor(who.units).parse(await readJson(req));
  return Response.json(await editBin(who, binId, input));
});

// DELETE /api/bins/[binId] — owners archive a bin (its readings and logbook stay)
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "manage");
  return Response.json({ bin: await archiveBinAs(who, binId) });
});
