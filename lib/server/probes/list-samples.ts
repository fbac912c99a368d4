import { listProbeSamples } from "@/db/queries/logbook";

/** The probe's oven-dry samples, newest first. */
export async function listSamples(probeId: number) {
  return { samples: await listProbeSamples(probeId) };
}
