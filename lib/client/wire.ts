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
