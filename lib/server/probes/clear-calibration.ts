import { setProbeCalibration } from "@/db/queries/logbook";

/** Forgets the probe's line: its raw readings are stored uncalibrated from now on. */
export async function clearProbeCalibration(probeId: number) {
  await setProbeCalibration(probeId, null);
  return { calibration: null };
}
