import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { rotateProbeToken } from "@/lib/server/probes/rotate-token";

type Ctx = { params: Promise<{ probeId: string }> };

// POST /api/probes/[probeId]/token — owners replace a lost or leaked token; the old one stops working
export const POST = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  const who = await requireMember({ probeId }, "manage");
  return Response.json(await rotateProbeToken(who, probeId), { headers: { "cache-control": "no-store" } });
});
