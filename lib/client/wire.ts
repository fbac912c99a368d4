// The data the browser receives, named once. Each type is a server answer as JSON carries it
// (lib/domain/wire.ts: dates become ISO strings), so a component that reads `raisedAt` knows it is
// a string whether the page primed the cache or the API answered. This is the one file where a
// row's type (never its code: type imports only) crosses into the client layer.
import type { FeedingEntry } from "@/db/queries/feedings";
import type { listIngredients } from "@/db/queries/ingredients";
import type { LogbookEntry } from "@/db/queries/logbook";
import type { SeriesAnswer } from "@/db/queries/series";
import type { Today as TodayRow } from "@/db/queries/today";
import type { Wire } from "@/lib/domain/wire";
import type { addSample } from "@/lib/server/probes/add-sample";
import type { calibrationView } from "@/lib/server/probes/calibration-view";
import type { listProbes } from "@/lib/server/probes/list-probes";
import type { registerProbe } from "@/lib/server/probes/register";

/** A logbook feeding with its items and who logged it. */
export type Feeding = Wire<FeedingEntry>;
export type FeedingItem = Feeding["items"][number];
/** A library or farm ingredient. */
export type IngredientRow = Wire<Awaited<ReturnType<typeof listIngredients>>[number]>;
/** One entry of a bin's merged logbook. */
export type LogbookItem = Wire<LogbookEntry>;
/** A zone's or probe's series for one metric and window. */
export type Series = Wire<SeriesAnswer>;
/** The farm's Today board: bins, zones, latest readings, open alerts. */
export type Today = Wire<TodayRow>;
export type TodayBin = Today["bins"][number];
export type TodayZone = TodayBin["zones"][number];
/** The farm's probes with presence, battery and place. */
export type ProbeRow = Wire<Awaited<ReturnType<typeof listProbes>>["probes"][number]>;
/** A probe's oven-dry samples, its fitted line and each sample's residual. */
export type CalibrationView = Wire<Awaited<ReturnType<typeof calibrationView>>>;
/** What registering a probe answers: the probe and its one-time token. */
export type RegisteredProbe = Wire<Awaited<ReturnType<typeof registerProbe>>>;
/** What recording an oven-dry sample answers. */
export type RecordedSample = Wire<Awaited<ReturnType<typeof addSample>>>;
