import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { idempotencyKey, loggedResponse } from "@/lib/web/idempotency-key";
import { sampleCreateFor } from "@/lib/domain/validation/log-entries";
import { addSample } from "@/lib/server/probes/add-sample";
import { listSamples } from "@/lib/server/probes/list-samples";

type Ctx = { params: Promise<{ probeId: string }> };

// GET /api/probes/[probeId]/samples — the probe's oven-dry samples, newest first
export const GET = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "read");
  return Response.json(await listSamples(probeId));
});

// POST /api/probes/[probeId]/samples — record an oven-dry sample taken beside the probe; a repeated
// Idempotency-Key answers 200 with the sample stored the first time
export const POST = route(async (req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  const who = await requireMember({ probeId }, "log");
  const input = { ...sampleCreateFor(who.units).parse(await readJson(req)), clientKey: idempotencyKey(req) };
  return loggedResponse(await addSample(who, probeId, input));
});
