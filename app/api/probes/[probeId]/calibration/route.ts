import { getProbePlace, listProbeSamples, setProbeCalibration } from "@/db/queries/logbook";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { fitCalibration } from "@/lib/domain/calibration";
import { AppError } from "@/lib/domain/errors";

type Ctx = { params: Promise<{ probeId: string }> };

async function fitOf(probeId: number) {
  const samples = await listProbeSamples(probeId);
  const used = samples.filter((s) => s.rawReading != null);
  return { samples, used, fit: fitCalibration(used.map((s) => ({ raw: s.rawReading!, moisturePct: s.moistureWbPct }))) };
}

// GET /api/probes/[probeId]/calibration — the stored line, the samples, and each sample's residual against it
export const GET = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "read");
  const place = await getProbePlace(probeId);
  const { samples } = await fitOf(probeId);
  const cal = place?.calibration ?? null;
  const residuals = cal
    ? samples
        .filter((s) => s.rawReading != null)
        .map((s) => ({
          sampleId: s.id,
          raw: s.rawReading!,
          moisturePct: s.moistureWbPct,
          residual: s.moistureWbPct - (cal.intercept + cal.slope * s.rawReading!),
        }))
    : [];
  return Response.json({ calibration: cal, samples, residuals });
});

// POST /api/probes/[probeId]/calibration — fit a line from the probe's samples that carry a raw reading, and keep it
export const POST = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "manage");
  const { used, fit } = await fitOf(probeId);
  if (!fit.ok) throw new AppError("invalid", fit.error.message, "samples");
  const calibration = { slope: fit.value.slope, intercept: fit.value.intercept, r2: fit.value.r2, fittedAt: new Date().toISOString(), points: fit.value.n };
  await setProbeCalibration(probeId, calibration);
  const residuals = used.map((s, i) => ({ sampleId: s.id, raw: s.rawReading!, moisturePct: s.moistureWbPct, residual: fit.value.residuals[i]! }));
  return Response.json({ calibration, residuals, rawMin: fit.value.rawMin, rawMax: fit.value.rawMax });
});

// DELETE /api/probes/[probeId]/calibration — forget the line; raw readings are then stored uncalibrated
export const DELETE = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "manage");
  await setProbeCalibration(probeId, null);
  return Response.json({ calibration: null });
});
