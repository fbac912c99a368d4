import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { probeUpdate } from "@/lib/domain/validation/probes";
import { updateProbe } from "@/lib/server/probes/update";

type Ctx = { params: Promise<{ probeId: string }> };

// PATCH /api/probes/[probeId] — owners move a probe to another zone, relabel, change its interval, archive it
export const PATCH = route(async (req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  const who = await requireMember({ probeId }, "manage");
  const input = probeUpdate.parse(await readJson(req));
  return Response.json(await updateProbe(who, probeId, input));
});
