import { onReplica } from "@/db";
import type { SeriesQuery } from "@/lib/domain/validation/series";
import { getBinSeries } from "@/lib/server/series/bin-series";
import { getProbeSeries } from "@/lib/server/series/probe-series";
import { getZoneSeries } from "@/lib/server/series/zone-series";

// Chart reads go to the read replica while it is fresh (db/index.ts onReplica): a chart of
// readings minutes apart cannot show a lag of seconds, and no screen reads a chart to see its own
// write (the logbook, the forms, the alerts and the session stay on the primary).

/** One metric of a zone's probes for a chart, as getZoneSeries, on the replica when fresh. */
export const readZoneSeries = (zoneId: string, q: SeriesQuery) => onReplica(() => getZoneSeries(zoneId, q));

/** One metric of every zone of a bin, as getBinSeries, on the replica when fresh. */
export const readBinSeries = (binId: string, q: SeriesQuery) => onReplica(() => getBinSeries(binId, q));

/** One metric of one probe, as getProbeSeries, on the replica when fresh. */
export const readProbeSeries = (probeId: number, q: SeriesQuery) => onReplica(() => getProbeSeries(probeId, q));
