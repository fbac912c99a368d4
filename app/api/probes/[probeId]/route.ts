import { updateProbe, zoneFarm } from "@/db/queries/probes";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { AppError, readJson } from "@/lib/web/errors";
import { probeUpdate } from "@/lib/domain/validation/probes";

type Ctx = { params: Promise<{ probeId: string }> };

// PATCH /api/probes/[probeId] — owners move a probe to another zone, relabel, change its interval, archive it
export const PATCH = route(async (req, { params }: Ctx) => {
  const { probeId } = await params;
  const id = Number(probeId);
  const who = await requireMember({ probeId: id }, "manage");
  const { archived, ...patch } = probeUpdate.parse(await readJson(req));
  if (patch.zoneId && (await zoneFarm(patch.zoneId)) !== who.farmId) throw new AppError("invalid", "That zone is not on this farm.", "zoneId");
  const p = await updateProbe(id, { ...patch, ...(archived === undefined ? {} : { archivedAt: archived ? new Date() : null }) });
  const { tokenHash: _hash, ...safe } = p!;
  return Response.json({ probe: safe });
});
