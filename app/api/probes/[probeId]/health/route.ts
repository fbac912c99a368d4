import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { probeHealth } from "@/lib/server/probes/probe-health";

type Ctx = { params: Promise<{ probeId: string }> };

// GET /api/probes/[probeId]/health — whether the probe is reporting, its latest values and its latest refused messages in plain words
export const GET = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  const who = await requireMember({ probeId }, "read");
  return Response.json(await probeHealth(who, probeId), { headers: { "cache-control": "no-store" } });
});
