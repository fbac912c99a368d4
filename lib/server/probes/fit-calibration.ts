import { listProbeSamples, setProbeCalibration } from "@/db/queries/logbook";
import { fitCalibration } from "@/lib/domain/calibration";
import { AppError } from "@/lib/domain/errors";
import { calibrationPoints } from "./calibration-points";

/** Fits a line from the probe's samples that carry a raw reading and keeps it for the ingest to apply. */
export async function fitProbeCalibration(probeId: number) {
  const points = calibrationPoints(await listProbeSamples(probeId));
  const fit = fitCalibration(points);
  if (!fit.ok) throw new AppError("invalid", fit.error.message, "samples");
  const { slope, intercept, r2, n, rawMin, rawMax } = fit.value;
  const calibration = { slope, intercept, r2, fittedAt: new Date().toISOString(), points: n };
  await setProbeCalibration(probeId, calibration);
  const residuals = points.map((p, i) => ({ ...p, residual: fit.value.residuals[i]! }));
  return { calibration, residuals, rawMin, rawMax };
}
