import { getProbePlace, insertSample, listProbeSamples, nearestRawReading } from "@/db/queries/logbook";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { moistureWetBasis } from "@/lib/domain/calibration";
import { AppError, readJson } from "@/lib/web/errors";
import { sampleCreate } from "@/lib/domain/validation/log-entries";

type Ctx = { params: Promise<{ probeId: string }> };

// GET /api/probes/[probeId]/samples — the probe's oven-dry samples, newest first
export const GET = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "read");
  return Response.json({ samples: await listProbeSamples(probeId) });
});

// POST /api/probes/[probeId]/samples — record an oven-dry sample taken beside the probe
export const POST = route(async (req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  const who = await requireMember({ probeId }, "log");
  const input = sampleCreate.parse(await readJson(req));
  const place = await getProbePlace(probeId);
  if (!place?.binId) throw new AppError("invalid", "Place the probe in a zone of a bin before sampling beside it.", "probeId");
  const wb = moistureWetBasis({ wetMassG: input.wetMassG, dryMassG: input.dryMassG, tareG: input.tareG });
  if (!wb.ok) throw new AppError("invalid", wb.error.message, wb.error.field);
  const at = input.at ?? new Date();
  // When the keeper did not read the probe, take what it reported nearest the sampling time.
  const raw = input.rawReading ?? (await nearestRawReading(probeId, at))?.value ?? null;
  const sample = await insertSample({
    farmId: who.farmId,
    binId: place.binId,
    zoneId: place.zoneId,
    probeId,
    at,
    byUserId: who.userId,
    notes: input.notes ?? null,
    wetMassG: input.wetMassG,
    dryMassG: input.dryMassG,
    tareG: input.tareG ?? 0,
    ovenTempC: input.ovenTempC ?? null,
    rawReading: raw,
    moistureWbPct: wb.value,
  });
  return Response.json({ sample, rawFrom: input.rawReading != null ? "given" : raw != null ? "probe" : "none" }, { status: 201 });
});
