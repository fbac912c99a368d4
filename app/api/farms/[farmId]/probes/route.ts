import { randomBytes } from "node:crypto";
import { createProbe, listFarmProbesWithStatus, zoneFarm } from "@/db/queries/probes";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { AppError, readJson } from "@/lib/web/errors";
import { probeCreate } from "@/lib/domain/validation/probes";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/probes — every probe with its zone, last seen, battery, signal, online
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json({ probes: await listFarmProbesWithStatus(who.farmId) });
});

// POST /api/farms/[farmId]/probes — owners register a probe; its token is in this answer only
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const input = probeCreate.parse(await readJson(req));
  if (input.zoneId && (await zoneFarm(input.zoneId)) !== who.farmId) throw new AppError("invalid", "That zone is not on this farm.", "zoneId");
  const token = randomBytes(24).toString("base64url");
  const probe = await createProbe({
    farmId: who.farmId,
    zoneId: input.zoneId ?? null,
    code: input.code,
    label: input.label ?? null,
    metrics: input.metrics,
    reportIntervalS: input.reportIntervalS,
    token,
  });
  const { tokenHash: _hash, ...safe } = probe;
  return Response.json({ probe: safe, token, note: "Copy the token now: it is shown only once." }, { status: 201, headers: { "cache-control": "no-store" } });
});
