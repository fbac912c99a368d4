import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { archiveZoneAs } from "@/lib/server/zones/archive-zone";
import { editZone } from "@/lib/server/zones/edit-zone";
import { readZone } from "@/lib/server/zones/read-zone";
import { zoneUpdate } from "@/lib/domain/validation/farm";

type Ctx = { params: Promise<{ zoneId: string }> };

// GET /api/zones/[zoneId] — one zone
export const GET = route(async (_req, { params }: Ctx) => {
  const { zoneId } = await params;
  await requireMember({ zoneId }, "read");
  return Response.json(await readZone(zoneId));
});

// PATCH /api/zones/[zoneId] — owners rename a zone, change its kind or position
export const PATCH = route(async (req, { params }: Ctx) => {
  const { zoneId } = await params;
  await requireMember({ zoneId }, "manage");
  const input = zoneUpdate.parse(await readJson(req));
  return Response.json(await editZone(zoneId, input));
});

// DELETE /api/zones/[zoneId] — owners archive a zone (its readings stay)
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { zoneId } = await params;
  await requireMember({ zoneId }, "manage");
  return Response.json(await archiveZoneAs(zoneId));
});
