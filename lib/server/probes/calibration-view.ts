import { getProbePlace, listProbeSamples } from "@/db/queries/logbook";
import { calibrationPoints } from "./calibration-points";

/** The probe's stored calibration line, its samples, and each sample's residual against the line. */
export async function calibrationView(probeId: number) {
  const [place, samples] = await Promise.all([getProbePlace(probeId), listProbeSamples(probeId)]);
  const cal = place?.calibration ?? null;
  const residuals = cal ? calibrationPoints(samples).map((p) => ({ ...p, residual: p.moisturePct - (cal.intercept + cal.slope * p.raw) })) : [];
  return { calibration: cal, samples, residuals };
}
