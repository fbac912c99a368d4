import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { probeCreate } from "@/lib/domain/validation/probes";
import { listProbes } from "@/lib/server/probes/list-probes";
import { registerProbe } from "@/lib/server/probes/register";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/probes — every probe with its zone, battery, signal and presence (reporting, silent since, no reading yet)
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json(await listProbes(who));
});

// POST /api/farms/[farmId]/probes — owners register a probe; its token is in this answer only
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const input = probeCreate.parse(await readJson(req));
  return Response.json(await registerProbe(who, input), { status: 201, headers: { "cache-control": "no-store" } });
});
