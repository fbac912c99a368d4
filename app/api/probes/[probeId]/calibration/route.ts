import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { calibrationView } from "@/lib/server/probes/calibration-view";
import { clearProbeCalibration } from "@/lib/server/probes/clear-calibration";
import { fitProbeCalibration } from "@/lib/server/probes/fit-calibration";

type Ctx = { params: Promise<{ probeId: string }> };

// GET /api/probes/[probeId]/calibration — the stored line, the samples, and each sample's residual against it
export const GET = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "read");
  return Response.json(await calibrationView(probeId));
});

// POST /api/probes/[probeId]/calibration — fit a line from the probe's samples that carry a raw reading, and keep it
export const POST = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "manage");
  return Response.json(await fitProbeCalibration(probeId));
});

// DELETE /api/probes/[probeId]/calibration — forget the line; raw readings are then stored uncalibrated
export const DELETE = route(async (_req, { params }: Ctx) => {
  const probeId = Number((await params).probeId);
  await requireMember({ probeId }, "manage");
  return Response.json(await clearProbeCalibration(probeId));
});
