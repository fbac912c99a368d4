import type { listProbeSamples } from "@/db/queries/logbook";

type Sample = Awaited<ReturnType<typeof listProbeSamples>>[number];

/** The samples that carry a raw reading: the points a calibration line is fitted to and checked against. */
export const calibrationPoints = (samples: readonly Sample[]) =>
  samples.flatMap((s) => (s.rawReading == null ? [] : [{ sampleId: s.id, raw: s.rawReading, moisturePct: s.moistureWbPct }]));
